"""``pullproof review`` through the command line: exit codes, selection, errors, JSON output.

The verdicts behind these exit codes are pinned, with their sources, in tests/test_review.py.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from pullproof.cli import main

REPO = Path(__file__).resolve().parents[1]
PANEL = str(REPO / "fixtures" / "review" / "interlock_panel.kicad_sch")
MCU_PARTS = str(REPO / "fixtures" / "parts" / "generic_mcu33.toml")
BASE = ["review", PANEL, "--parts", MCU_PARTS]


# (extra arguments, exit code): R23 is the only marginal network, R10 an incomplete one,
# the whole panel has failures.
EXITS = [
    ([], 1),
    (["--fail-on", "fail"], 1),
    (["--ref", "R23"], 0),
    (["--ref", "R23", "--fail-on", "incomplete"], 0),
    (["--ref", "R23", "--fail-on", "marginal"], 1),
    (["--ref", "R10"], 0),
    (["--ref", "R10", "--fail-on", "incomplete"], 1),
    (["--ref", "R10", "--fail-on", "marginal"], 1),
    (["--ref", "R1,R3"], 0),  # two passing networks
    (["--ref", "R1,R3", "--fail-on", "marginal"], 0),
]


@pytest.mark.parametrize(("extra", "code"), EXITS)
def test_exit_codes(extra: list[str], code: int, capsys: pytest.CaptureFixture[str]) -> None:
    assert main([*BASE, *extra]) == code
    assert capsys.readouterr().err == ""


def _nets(capsys: pytest.CaptureFixture[str], *extra: str) -> set[str]:
    main([*BASE, "--json", *extra])
    return {n["net"] for n in json.loads(capsys.readouterr().out)["networks"]}


def test_ref_restricts(capsys: pytest.CaptureFixture[str]) -> None:
    # R3 and R7..R9 (R9 pulls the tool probe); every other pull is left out
    nets = _nets(capsys, "--ref", "R3,R7-R9")
    assert nets == {"/GUARD_CLOSED", "/I2C_SDA", "/I2C_SCL", "/TOOL_PROBE"}


def test_where_restricts(capsys: pytest.CaptureFixture[str]) -> None:
    nets = _nets(capsys, "--where", "Tolerance=1%")
    assert nets == {"/STOP_BTN", "/GUARD_CLOSED", "/LID_SW", "/I2C_SDA", "/I2C_SCL"}


def test_ref_and_where_combine(capsys: pytest.CaptureFixture[str]) -> None:
    assert _nets(capsys, "--ref", "R1-R5", "--where", "Tolerance=1%", "--where", "Value=4k*") == {
        "/STOP_BTN"
    }


def test_console_report(capsys: pytest.CaptureFixture[str]) -> None:
    assert main([*BASE, "--ref", "R2"]) == 1
    out = capsys.readouterr().out
    assert out.startswith(f"pullproof review of {PANEL}\n")
    assert "/STOP_BTN  R2" in out
    assert "can reach 4.79 kΩ, above the 2 kΩ at which the current out of the inputs" in out
    assert out.endswith("1 networks (fail 1); 0 findings\n")


ERR = "pullproof: --"
BAD_SELECTIONS = [
    (["--ref", "R9-R7"], ERR + "ref: range 'R9-R7' runs backwards; expected e.g. R7-R12"),
    (["--ref", "R1,,R2"], ERR + "ref: empty item in 'R1,,R2'; expected e.g. R3,R7-R12"),
    (["--where", "Tolerance"], ERR + "where: cannot read 'Tolerance'; expected FIELD=VALUE"),
]


@pytest.mark.parametrize(("extra", "message"), BAD_SELECTIONS)
def test_bad_selection(extra: list[str], message: str, capsys: pytest.CaptureFixture[str]) -> None:
    assert main([*BASE, *extra]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    assert captured.err == message + "\n"


@pytest.mark.parametrize(
    ("text", "where", "message"),
    [
        ('[rails]\n"+5V" = "5V\n', "2:12", "malformed TOML: Illegal character '\\n'"),
        (
            'margin = "fast"\n',
            "1:1",
            "rules key 'margin': cannot read 'fast'; expected a voltage with its unit, such as "
            "3V3, +5V, 1.8 V or 230VAC",
        ),
    ],
)
def test_malformed_rules_file(
    text: str, where: str, message: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    rules = tmp_path / "rules.toml"
    rules.write_text(text, encoding="utf-8")
    before = rules.read_bytes()
    assert main([*BASE, "--rules", str(rules)]) == 2
    err = capsys.readouterr().err
    assert err == f"{rules}:{where}: {message}\n"
    assert rules.read_bytes() == before  # the user's file is never touched


def test_missing_root(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    missing = tmp_path / "nothing.kicad_sch"
    assert main(["review", str(missing)]) == 2
    err = capsys.readouterr().err
    assert err == f"pullproof: cannot read {missing}: No such file or directory\n"


def test_broken_schematic(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    root = tmp_path / "cut.kicad_sch"
    root.write_text('(kicad_sch (version 20231120)\n  (symbol "R"\n', encoding="utf-8")
    assert main(["review", str(root)]) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"{root}:")
    assert err.count("\n") == 1 and "Traceback" not in err


def test_json_on_stdout(capsys: pytest.CaptureFixture[str]) -> None:
    assert main([*BASE, "--json"]) == 1
    doc = json.loads(capsys.readouterr().out)
    assert doc["schema"] == "pullproof.review/1"
    assert doc["worst"] == "fail"
    assert len(doc["networks"]) == 15
