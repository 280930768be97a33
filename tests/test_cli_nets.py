"""`pullproof nets`: the table, the pullproof.nets/1 JSON contract, and one-line input errors."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from builder import SchematicBuilder
from conftest import CONNECTIVITY
from pullproof.cli import main


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(["nets", *args])
    out, err = capsys.readouterr()
    return code, out, err


def test_table(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, err = run(capsys, str(CONNECTIVITY / "greenhouse_vent.kicad_sch"))
    assert code == 0 and err == ""
    lines = out.splitlines()
    assert lines[0] == "greenhouse_vent.kicad_sch: 1 sheet(s), 8 part(s), 11 net(s)"
    assert any(line.startswith("+5V [power]") and line.endswith("R1.1") for line in lines)
    assert any(line.startswith("/FAN_SENSE") and "R2.1 R3.2" in line for line in lines)


def test_json_contract(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, str(CONNECTIVITY / "beehive" / "beehive.kicad_sch"), "--json")
    assert code == 0
    doc = json.loads(out)
    # keys and types exactly as DESIGN.md "Contract: pullproof nets ROOT --json"
    assert set(doc) == {"schema", "root", "sheets", "parts", "nets"}
    assert doc["schema"] == "pullproof.nets/1" and doc["root"] == "beehive.kicad_sch"
    for sheet in doc["sheets"]:
        assert set(sheet) == {"path", "file"} and all(isinstance(v, str) for v in sheet.values())
    for part in doc["parts"]:
        assert set(part) == {"ref", "value", "lib_id", "sheet", "fields"}
        assert all(isinstance(part[k], str) for k in ("ref", "value", "lib_id", "sheet"))
        assert all(isinstance(k, str) and isinstance(v, str) for k, v in part["fields"].items())
    pins = []
    for net in doc["nets"]:
        assert set(net) == {"name", "members"} and isinstance(net["name"], str)
        for m in net["members"]:
            assert set(m) == {"ref", "pin", "type"} and all(isinstance(v, str) for v in m.values())
            pins.append((m["ref"], m["pin"]))
    assert len(pins) == len(set(pins))
    assert {"path": "/HIVE_B/", "file": "load_cell.kicad_sch"} in doc["sheets"]


def _write(tmp_path: Path, text: str, name: str = "panel.kicad_sch") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize(
    ("text", "where", "message"),
    [
        ("", "1:1", "empty file: expected a '(' list"),
        (
            "(kicad_sch\n  (version 20231120)\n",
            "1:1",
            "unclosed '(': missing ')' before the end of the file",
        ),
        (
            "(kicad_sch (version 20231120)))",
            "1:31",
            "unexpected text after the end of the top-level list",
        ),
        (
            '(kicad_sch\n  (label "OPEN (at 1 2 0))\n)',
            "2:10",
            "unterminated string: missing closing '\"'",
        ),
        ("(kicad_sch\n  (junction (at 1.27 inf)))", "2:22", "number 'inf' is not finite"),
        (
            "(kicad_pcb (version 20231120))",
            "1:1",
            "not a schematic: it is a board file (kicad_pcb)",
        ),
        ("(kicad_sch " + "(x " * 200 + ")" * 201, "1:309", "lists nested deeper than 100 levels"),
    ],
)
def test_malformed_input(
    capsys: pytest.CaptureFixture[str], tmp_path: Path, text: str, where: str, message: str
) -> None:
    path = _write(tmp_path, text)
    before = path.read_bytes()
    code, out, err = run(capsys, str(path))
    assert (code, out) == (2, "")
    assert err == f"{path}:{where}: {message}\n"
    assert path.read_bytes() == before  # the user's file is never changed


def _parent(tmp_path: Path, child: str) -> Path:
    b = SchematicBuilder()
    b.sheet("PUMP", child, at=(50.8, 50.8))
    return b.write(tmp_path / "doser.kicad_sch")


def test_missing_sub_sheet(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    root = _parent(tmp_path, "pump.kicad_sch")
    line_no = next(i for i, t in enumerate(root.read_text().splitlines(), 1) if "(sheet " in t)
    col = root.read_text().splitlines()[line_no - 1].index('(property "Sheetfile"') + 1
    code, _, err = run(capsys, str(root))
    assert code == 2
    assert err == (
        f"{root}:{line_no}:{col}: cannot read sheet file 'pump.kicad_sch': "
        "No such file or directory\n"
    )


def test_sheet_including_itself(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    root = _parent(tmp_path, "pump.kicad_sch")
    b = SchematicBuilder()
    b.sheet("BACK", "doser.kicad_sch", at=(10.16, 10.16))
    pump = b.write(tmp_path / "pump.kicad_sch")
    line_no = next(i for i, t in enumerate(pump.read_text().splitlines(), 1) if "(sheet " in t)
    col = pump.read_text().splitlines()[line_no - 1].index('(property "Sheetfile"') + 1
    code, _, err = run(capsys, str(root))
    assert code == 2
    child = tmp_path / "pump.kicad_sch"
    assert err == (
        f"{child}:{line_no}:{col}: sheet 'doser.kicad_sch' includes itself "
        "(doser.kicad_sch → pump.kicad_sch → doser.kicad_sch)\n"
    )


def test_sheet_including_itself_directly(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    root = _parent(tmp_path, "doser.kicad_sch")
    code, _, err = run(capsys, str(root))
    assert code == 2 and "sheet 'doser.kicad_sch' includes itself" in err
    assert err.startswith(f"{root}:") and err.count("\n") == 1


def test_missing_root(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    code, _, err = run(capsys, str(tmp_path / "none.kicad_sch"))
    assert code == 2
    assert (
        err == f"pullproof: cannot read {tmp_path / 'none.kicad_sch'}: No such file or directory\n"
    )


def test_not_utf8(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    path = tmp_path / "panel.kicad_sch"
    path.write_bytes(b'(kicad_sch\n  (label "\xff"))')
    code, _, err = run(capsys, str(path))
    assert (code, err) == (2, f"{path}:2:11: the file is not UTF-8 text\n")
