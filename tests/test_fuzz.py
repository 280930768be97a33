"""Mutated schematics never crash the CLI: exit 0, 1 or 2, and at most one line on stderr.

The inputs are real fixtures with random damage (characters deleted, duplicated or inserted,
truncation, tokens swapped), the kinds of corruption a bad merge or a half-written file leaves.
"""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from conftest import CONNECTIVITY, FIXTURES
from pullproof.cli import main

# Roots whose sub-sheets are copied beside the mutated root, so hierarchy code runs too.
SOURCES = [
    *sorted(CONNECTIVITY.glob("*.kicad_sch")),
    CONNECTIVITY / "beehive" / "beehive.kicad_sch",
    FIXTURES / "demo" / "irrigation.kicad_sch",
    FIXTURES / "demo" / "inputs.kicad_sch",
]
TEXTS = [(p, p.read_text(encoding="utf-8")) for p in SOURCES]
NOISE = st.sampled_from([*list('()"\\0123456789.-e \n\t{}'), "inf", "nan", "1e999", "(("])


@st.composite
def mutated(draw: st.DrawFn) -> tuple[Path, str]:
    source, text = draw(st.sampled_from(TEXTS))
    for _ in range(draw(st.integers(1, 6))):
        if not text:
            break
        i = draw(st.integers(0, len(text) - 1))
        op = draw(st.sampled_from(["delete", "duplicate", "insert", "truncate", "swap"]))
        if op == "delete":
            text = text[:i] + text[i + draw(st.integers(1, 8)) :]
        elif op == "duplicate":
            text = text[:i] + text[i : i + 40] + text[i:]
        elif op == "insert":
            text = text[:i] + draw(NOISE) + text[i:]
        elif op == "truncate":
            text = text[:i]
        else:  # swap two whitespace-separated tokens
            tokens = text.split(" ")
            a = draw(st.integers(0, len(tokens) - 1))
            b = draw(st.integers(0, len(tokens) - 1))
            tokens[a], tokens[b] = tokens[b], tokens[a]
            text = " ".join(tokens)
    return source, text


@pytest.mark.parametrize("command", ["nets", "review"])
@settings(
    max_examples=int(os.environ.get("PULLPROOF_FUZZ_EXAMPLES", "100")),
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
@given(case=mutated())
def test_mutated_schematic_gives_a_known_exit_code_and_one_line(
    command: str, case: tuple[Path, str], tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    source, text = case
    for sibling in source.parent.glob("*.kicad_sch"):
        shutil.copyfile(sibling, tmp_path / sibling.name)
    path = tmp_path / source.name
    path.write_text(text, encoding="utf-8")
    code = main([command, str(path)])
    err = capsys.readouterr().err
    assert code in (0, 1, 2), err
    assert err.count("\n") <= 1, err
