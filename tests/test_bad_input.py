"""Bad input from the user's side: one line naming the file or field, exit 2, files untouched.

Each case builds a damaged copy of the demo project, runs the CLI, and checks the exact
message, the exit code, that nothing went to stdout as a traceback, and that every file the
user gave is byte-identical afterwards.
"""

from __future__ import annotations

import hashlib
from collections.abc import Callable
from pathlib import Path

import pytest

from conftest import FIXTURES
from pullproof.cli import main

DEMO = FIXTURES / "demo"
ROOT = "irrigation.kicad_sch"


def _digests(folder: Path) -> dict[str, str]:
    return {
        str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file()
    }


def _run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str]:
    code = main(list(argv))
    err = capsys.readouterr().err
    return code, err


def _write(name: str, data: bytes) -> Callable[[Path], None]:
    def make(folder: Path) -> None:
        (folder / name).write_bytes(data)

    return make


def _replace(name: str, old: str, new: str) -> Callable[[Path], None]:
    def make(folder: Path) -> None:
        path = folder / name
        text = path.read_text(encoding="utf-8")
        assert old in text
        path.write_text(text.replace(old, new, 1), encoding="utf-8")

    return make


def _sheet_is_folder(folder: Path) -> None:
    (folder / "mains.kicad_sch").unlink()
    (folder / "mains.kicad_sch").mkdir()


def _nothing(folder: Path) -> None:
    pass


MCU_MATCH = 'match = ["*GENERIC_MCU33*"]'
PARTS = "pullproof-parts.toml"

# (case id, how to damage the project, argv after the command, exact stderr line)
CASES: list[tuple[str, Callable[[Path], None], list[str], str]] = [
    ("missing root", _nothing, ["review", "gone.kicad_sch"],
     "pullproof: cannot read gone.kicad_sch: No such file or directory"),
    ("root is a folder", lambda f: (f / "d.kicad_sch").mkdir(), ["nets", "d.kicad_sch"],
     "pullproof: cannot read d.kicad_sch: Is a directory"),
    ("binary root", _write("b.kicad_sch", b"(kicad_sch \n (x \xff\xfe\x00\x81))"),
     ["review", "b.kicad_sch"], "b.kicad_sch:2:5: the file is not UTF-8 text"),
    ("UTF-16 root", _write("w.kicad_sch", "(kicad_sch)".encode("utf-16")),
     ["nets", "w.kicad_sch"], "w.kicad_sch:1:1: the file is not UTF-8 text"),
    ("sheet file is a folder", _sheet_is_folder, ["review", ROOT],
     f"{ROOT}:61:128: cannot read sheet file 'mains.kicad_sch': Is a directory"),
    ("rules: bad value", _write("r.toml", b'margin = "abc"\n'),
     ["review", ROOT, "--rules", "r.toml"],
     "r.toml:1:1: rules key 'margin': cannot read 'abc'; expected a voltage with its unit, "
     "such as 3V3, +5V, 1.8 V or 230VAC"),
    ("rules: unknown key", _write("r.toml", b'\nmargn = "0.1V"\n'),
     ["review", ROOT, "--rules", "r.toml"],
     "r.toml:2:1: unknown rules key 'margn'; did you mean 'margin'?"),
    ("rules: wrong type", _write("r.toml", b"margin = true\n"),
     ["review", ROOT, "--rules", "r.toml"],
     "r.toml:1:1: rules key 'margin': write the value as text, e.g. \"5%\""),
    ("rules: section given a value", _write("r.toml", b"temperature = 5\n"),
     ["review", ROOT, "--rules", "r.toml"],
     "r.toml:1:1: rules key 'temperature': write a table, e.g. [temperature]"),
    ("rules: net entry not a table", _write("r.toml", b"net = [5]\n"),
     ["review", ROOT, "--rules", "r.toml"],
     "r.toml:1:1: rules key 'net': write [[net]] entries with match = \"…\""),
    ("rules: net match not text", _write("r.toml", b"[[net]]\nmatch = 5\n"),
     ["review", ROOT, "--rules", "r.toml"],
     "r.toml:2:1: a [[net]] entry needs match = \"NET-PATTERN\""),
    ("rules: invalid TOML", _write("r.toml", b"series = \n"), ["review", ROOT, "--rules", "r.toml"],
     "r.toml:1:10: malformed TOML: Invalid value"),
    ("rules: not UTF-8", _write("r.toml", b'series = "E24"\n\xff\n'),
     ["review", ROOT, "--rules", "r.toml"], "r.toml:2:1: the rules file is not UTF-8 text"),
    ("rules: missing", _nothing, ["review", ROOT, "--rules", "none.toml"],
     "pullproof: cannot read rules file none.toml: No such file or directory"),
    ("parts: bad value", _replace(PARTS, 'i_high = "1uA"', 'i_high = "abc"'), ["review", ROOT],
     f"{PARTS}:23:1: field 'i_high' of [part.GENERIC-MCU33]: cannot read 'abc'; expected a "
     "current with its unit, such as 1µA, 0.4mA or -0.4 mA"),
    ("parts: unknown key", _replace(PARTS, 'i_high = "1uA"', 'i_hgh = "1uA"'), ["review", ROOT],
     f"{PARTS}:23:1: [part.GENERIC-MCU33]: cannot read 'i_hgh'; expected a known key "
     "(see the file header)"),
    ("parts: match not a list", _replace(PARTS, MCU_MATCH, "match = 5"), ["review", ROOT],
     f"{PARTS}:16:1: field 'match' of [part.GENERIC-MCU33]: cannot read '5'; expected a "
     'list of globs such as ["*MCU*"]'),
    ("parts: one glob as a string", _replace(PARTS, MCU_MATCH, 'match = "*MCU*"'),
     ["review", ROOT],
     f"{PARTS}:16:1: field 'match' of [part.GENERIC-MCU33]: cannot read '*MCU*'; expected "
     'a list of globs such as ["*MCU*"]'),
    ("parts: internal pull of three values",
     _replace(PARTS, 'internal_pull = ["30k", "50k"]', 'internal_pull = ["30k", "40k", "50k"]'),
     ["review", ROOT],
     f"{PARTS}:27:1: field 'internal_pull' of [part.GENERIC-MCU33]: cannot read "
     "\"['30k', '40k', '50k']\"; expected a range [\"30k\", \"50k\"] or \"none\""),
    ("parts: schmitt flag as text",
     _replace(PARTS, "schmitt_inputs = true", 'schmitt_inputs = "no"'), ["review", ROOT],
     f"{PARTS}:26:1: field 'schmitt_inputs' of [part.GENERIC-MCU33]: cannot read 'no'; "
     "expected true or false"),
    ("parts: levels not rows",
     _write("p.toml", b'[part.X]\nmatch = ["*"]\nsupply = ["3V", "3.6V"]\nlevels = 5\n'),
     ["review", ROOT, "--parts", "p.toml"],
     "p.toml:4:1: field 'levels' of [part.X]: cannot read '5'; expected [[levels]] rows"),
    ("parts: part is not a table", _write("p.toml", b"part = 5\n"),
     ["review", ROOT, "--parts", "p.toml"],
     "p.toml:1:1: cannot read '5'; expected [part.NAME] tables"),
    ("parts: unknown top-level key", _write("p.toml", b"parts = 5\n"),
     ["review", ROOT, "--parts", "p.toml"],
     "p.toml:1:1: cannot read 'parts'; expected only [part.NAME] tables"),
    ("parts: invalid TOML", _write("p.toml", b"[part.X]\nkind = \n"),
     ["review", ROOT, "--parts", "p.toml"],
     "p.toml:2:8: cannot read 'p.toml'; expected a TOML part library (Invalid value)"),
    ("parts: not UTF-8", _write("p.toml", b"\xfe\n"), ["review", ROOT, "--parts", "p.toml"],
     "p.toml:1:1: the part library is not UTF-8 text"),
    ("parts: missing", _nothing, ["review", ROOT, "--parts", "none.toml"],
     "pullproof: cannot read part library none.toml: No such file or directory"),
    ("Tolerance abc", _replace("inputs.kicad_sch", '"Tolerance" "1%"', '"Tolerance" "abc"'),
     ["review", ROOT],
     "inputs.kicad_sch:64:298: field 'Tolerance' of R13: cannot read 'abc'; expected a "
     "percentage such as "
     "5% or ±1%"),
    ("--ref garbage", _nothing, ["review", ROOT, "--ref", "@@"],
     "pullproof: --ref: '@@' is not a reference or range; expected e.g. R3,R7-R12"),
    ("--ref across prefixes", _nothing, ["review", ROOT, "--ref", "R3-U4"],
     "pullproof: --ref: 'R3-U4' is not a reference or range; expected e.g. R3,R7-R12"),
    ("--ref names no part", _nothing, ["review", ROOT, "--ref", "R99,R98"],
     "pullproof: --ref: no part R98, R99 in the schematic"),
    ("note into a missing folder", _nothing, ["note", ROOT, "-o", "nowhere/n.html"],
     "pullproof: nowhere/n.html: cannot write the note (No such file or directory)"),
    ("note onto the schematic", _nothing, ["note", ROOT, "-o", ROOT],
     f"pullproof: {ROOT}: refusing to write the note over an input of the review"),
    ("note onto a sub-sheet", _nothing, ["note", ROOT, "-o", "inputs.kicad_sch"],
     "pullproof: inputs.kicad_sch: refusing to write the note over an input of the review"),
    ("demo into a file", _write("afile", b"keep me"), ["demo", "afile"],
     "pullproof: afile: is a file, not a folder; choose another folder for the demo"),
    ("demo below a file", _write("afile", b"keep me"), ["demo", "afile/sub"],
     "pullproof: afile/sub: cannot create the folder (Not a directory)"),
]  # fmt: skip


@pytest.mark.parametrize(
    ("make", "argv", "line"), [c[1:] for c in CASES], ids=[c[0] for c in CASES]
)
def test_bad_input_gives_one_line_exit_2_and_leaves_files_alone(
    project: Path,
    capsys: pytest.CaptureFixture[str],
    make: Callable[[Path], None],
    argv: list[str],
    line: str,
) -> None:
    make(project)
    before = _digests(project)
    code, err = _run(capsys, *argv)
    assert (code, err) == (2, line + "\n")
    assert _digests(project) == before


def test_a_byte_order_mark_is_read_past_in_rules_and_part_library(
    project: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    for name in ("pullproof.toml", PARTS):
        data = (project / name).read_bytes()
        (project / name).write_bytes(b"\xef\xbb\xbf" + data)
    code, err = _run(capsys, "review", ROOT)
    assert (code, err) == (1, "")  # the demo has failing networks on purpose
