"""The user guide stays true: every field, rules key, command and exit code is documented."""

from __future__ import annotations

from pathlib import Path

import pytest

from pullproof import limits
from pullproof.cli import _build_parser
from pullproof.errors import EXIT_FINDINGS, EXIT_INPUT, EXIT_INTERNAL, EXIT_OK
from pullproof.families.match import FIELDS
from pullproof.rules import KEYS, RANGES

README = Path(__file__).resolve().parents[1] / "README.md"

pytestmark = pytest.mark.skipif(not README.is_file(), reason="README.md not beside the tests")


@pytest.fixture(scope="module")
def readme() -> str:
    return README.read_text(encoding="utf-8")


@pytest.mark.parametrize("name", sorted(FIELDS))
def test_every_field_is_in_the_fields_table(readme: str, name: str) -> None:
    doc = FIELDS[name]
    assert f"| `{name}` | {doc.where} | {doc.meaning} | `{doc.example}` |" in readme


@pytest.mark.parametrize("key", sorted(KEYS))
def test_every_rules_key_is_documented_with_its_default_and_reason(readme: str, key: str) -> None:
    k = KEYS[key]
    default = f"`{k.default}`" if k.default else "(unset)"
    assert f"| `{key}` | {default} | {k.reason} |" in readme


def test_every_command_is_documented(readme: str) -> None:
    parser = _build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    for command in sub.choices:  # type: ignore[union-attr]
        assert f"`pullproof {command}" in readme


def test_exit_codes_are_documented(readme: str) -> None:
    table = readme.split("### Exit codes", 1)[1].split("##", 1)[0]
    for code in (EXIT_OK, EXIT_FINDINGS, EXIT_INPUT, EXIT_INTERNAL):
        assert f"| {code} |" in table


@pytest.mark.parametrize("key", sorted(RANGES))
def test_every_rules_range_is_documented(readme: str, key: str) -> None:
    assert f"| `{key}` | {RANGES[key].text} |" in readme


def test_the_robustness_section_states_the_limits_in_force(readme: str) -> None:
    section = readme.split("## Robustness", 1)[1].split("\n## ", 1)[0]
    for text in (
        f"{limits.DEFAULT_MAX_FILE_BYTES // 1_000_000} MB (`--max-file-size MB`)",
        f"{limits.DEFAULT_MAX_TOTAL_BYTES // 1_000_000} MB (`--max-total-size MB`)",
        f"| {limits.MAX_TEXT_FILE_BYTES // 1_000_000} MB each |",
        f"| {limits.MAX_TOKENS_PER_FILE:,} |",
        f"| {limits.MAX_TOKENS_TOTAL:,} |",
        f"| ±{limits.MAX_COORDINATE_MM:,} mm |",
        f"| {limits.MAX_BUS_MEMBERS} |",
        f"| {limits.MAX_INSTANCES:,} |",
        f"| {limits.MAX_SHEET_DEPTH} |",
        f"| {limits.MAX_EXPANDED_ITEMS:,} |",
        f"| {limits.MAX_WIRE_DIRECTIONS} |",
    ):
        assert text in section
