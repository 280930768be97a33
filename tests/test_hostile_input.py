"""Hostile and broken input, from the reading side: exit 2 with one exact line naming the
file (and line and column where there is one), no hang, nothing quoted from a file that is
not a schematic, and every file of the project byte-identical afterwards.

Each case damages a copy of the demo project (an invented greenhouse irrigation
controller) and runs the CLI in-process with a time bound (``hostile.bounded``).
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from collections.abc import Callable
from pathlib import Path

import pytest

from conftest import FIXTURES
from hostile import digests, run
from pullproof.limits import (
    MAX_BUS_MEMBERS,
    MAX_COORDINATE_MM,
    MAX_TOKENS_PER_FILE,
    MAX_TOKENS_TOTAL,
    InputPolicy,
    TokenBudget,
)
from pullproof.nets import build_circuit

DEMO = FIXTURES / "demo"  # the `project` fixture (conftest.py) is a copy of it
ROOT = "irrigation.kicad_sch"
MAINS = "mains.kicad_sch"
AT_MAINS = f"{ROOT}:61:128"  # the mains sheet's Sheetfile property in the root
PARTS = "pullproof-parts.toml"


def _edit(name: str, old: str, new: str) -> Callable[[Path], None]:
    def make(folder: Path) -> None:
        path = folder / name
        text = path.read_text(encoding="utf-8")
        assert old in text
        path.write_bytes(text.replace(old, new, 1).encode("utf-8"))

    return make


def _sheet_file(target: str) -> Callable[[Path], None]:
    """The root's mains sheet names ``target`` as its file."""
    return _edit(ROOT, f'"Sheetfile" "{MAINS}"', f'"Sheetfile" "{target}"')


def _mains_is(kind: str) -> Callable[[Path], None]:
    def make(folder: Path) -> None:
        sheet = folder / MAINS
        sheet.unlink()
        if kind == "symlink loop":
            os.symlink(MAINS, sheet)
        elif kind == "fifo":
            os.mkfifo(sheet)
        elif kind == "folder":
            sheet.mkdir()

    return make


def _write(name: str, text: str) -> Callable[[Path], None]:
    def make(folder: Path) -> None:
        (folder / name).write_bytes(text.encode("utf-8"))

    return make


def _append_to_inputs(items: str) -> Callable[[Path], None]:
    """Add top-level items at the end of the inputs sheet."""

    def make(folder: Path) -> None:
        path = folder / "inputs.kicad_sch"
        text = path.read_text(encoding="utf-8").rstrip()
        assert text.endswith(")")
        path.write_text(text[:-1] + items + "\n)\n", encoding="utf-8")

    return make


def _nothing(folder: Path) -> None:
    pass


def _placing(folder: Path, name: str, child: str, count: int) -> None:
    """A schematic ``name`` placing sheet file ``child`` ``count`` times."""
    blocks = "".join(
        f'\n (sheet (at 0 0) (uuid "{name}{i}") (property "Sheetname" "S{i}")'
        f' (property "Sheetfile" "{child}"))'
        for i in range(count)
    )
    text = f'(kicad_sch (version 20231120) (uuid "{name}"){blocks})\n'
    (folder / name).write_text(text, encoding="utf-8")


def _many_instances(folder: Path) -> None:
    """A root placing sheet A 101 times, A placing B 100 times: 10 202 instances."""
    (folder / "b.kicad_sch").write_text('(kicad_sch (version 20231120) (uuid "b"))\n', "utf-8")
    _placing(folder, "a.kicad_sch", "b.kicad_sch", 100)
    _placing(folder, "many.kicad_sch", "a.kicad_sch", 101)


def _env_file(folder: Path) -> None:
    """A file in the project folder that is not a schematic, named as the mains sheet."""
    (folder / ".env").write_text("CLOUD_TOKEN=greenhouse-0123456789\n", encoding="utf-8")
    _sheet_file(".env")(folder)


def _sparse(name: str, size: int) -> Callable[[Path], None]:
    """A file of ``size`` bytes that starts like a schematic (sparse: nothing is written)."""

    def make(folder: Path) -> None:
        with open(folder / name, "wb") as fh:
            fh.write(b"(kicad_sch (version 20231120)")
            fh.truncate(size)

    return make


def _board_as_sheet(folder: Path) -> None:
    (folder / "board.kicad_pcb").write_text("(kicad_pcb (version 20240108))\n", "utf-8")
    _sheet_file("board.kicad_pcb")(folder)


def _outside_link(folder: Path) -> None:
    """The mains sheet is a symbolic link inside the folder that points out of it."""
    outside = folder.parent / "elsewhere"
    outside.mkdir()
    (folder / MAINS).rename(outside / MAINS)
    os.symlink(outside / MAINS, folder / MAINS)


RULES = ["review", ROOT, "--rules", "r.toml"]
DERATE = "r.toml:1:1: rules key 'derating': '0%' is impossible; expected a value above 0% and"

# (case id, how to damage the project, argv, the exact line on stderr)
CASES: list[tuple[str, Callable[[Path], None], list[str], str]] = [
    # --- sheet files that are not regular files, or whose name cannot be used
    ("sheet is a symlink loop", _mains_is("symlink loop"), ["review", ROOT],
     f"{AT_MAINS}: cannot read sheet file '{MAINS}': Too many levels of symbolic links"),
    ("sheet is a folder", _mains_is("folder"), ["review", ROOT],
     f"{AT_MAINS}: cannot read sheet file '{MAINS}': Is a directory"),
    ("sheet is a FIFO", _mains_is("fifo"), ["review", ROOT],
     f"{AT_MAINS}: cannot read sheet file '{MAINS}': not a regular file (a named pipe)"),
    ("sheet is /dev/zero", _sheet_file("/dev/zero"), ["review", ROOT, "--allow-outside"],
     f"{AT_MAINS}: cannot read sheet file '/dev/zero': not a regular file (a device)"),
    ("sheet is /dev/urandom", _sheet_file("/dev/urandom"), ["nets", ROOT, "--allow-outside"],
     f"{AT_MAINS}: cannot read sheet file '/dev/urandom': not a regular file (a device)"),
    ("sheet name too long", _sheet_file("x" * 5000), ["review", ROOT],
     f"{AT_MAINS}: cannot read sheet file '{'x' * 40}'…: File name too long"),
    ("sheet name with NUL", _sheet_file("mains\x00.kicad_sch"), ["review", ROOT],
     f"{AT_MAINS}: the Sheetfile name contains a NUL character"),
    ("root is /dev/zero", _nothing, ["nets", "/dev/zero"],
     "pullproof: cannot read /dev/zero: not a regular file (a device)"),
    ("root is a FIFO", lambda f: os.mkfifo(f / "pipe.kicad_sch"), ["review", "pipe.kicad_sch"],
     "pullproof: cannot read pipe.kicad_sch: not a regular file (a named pipe)"),
    ("rules file is /dev/zero", _nothing, ["review", ROOT, "--rules", "/dev/zero"],
     "pullproof: cannot read rules file /dev/zero: not a regular file (a device)"),
    ("part library is a FIFO", lambda f: os.mkfifo(f / "p.toml"),
     ["review", ROOT, "--parts", "p.toml"],
     "pullproof: cannot read part library p.toml: not a regular file (a named pipe)"),
    ("gate on a symlink loop", lambda f: os.symlink("loop.kicad_sch", f / "loop.kicad_sch"),
     ["gate", "loop.kicad_sch"],
     "pullproof: cannot read loop.kicad_sch: Too many levels of symbolic links"),
    ("note onto a device", _nothing, ["note", ROOT, "-o", "/dev/null"],
     "pullproof: /dev/null: cannot write the note (not a regular file (a device))"),
    ("SARIF log onto a FIFO", lambda f: os.mkfifo(f / "log.sarif"),
     ["review", ROOT, "--sarif", "log.sarif"],
     "pullproof: log.sarif: cannot write the SARIF log (not a regular file (a named pipe))"),
    # --- numbers that overflow, coordinates off any sheet, absurd vectors
    ("coordinate 1e308", _edit("inputs.kicad_sch", "(at 50.8", "(at 1e308"), ["review", ROOT],
     f"inputs.kicad_sch:58:34: coordinate 1e+308 mm is outside the sheet "
     f"(at most ±{MAX_COORDINATE_MM} mm)"),
    ("wire 1 km long", _append_to_inputs("\n (wire (pts (xy -500000 0) (xy 500000 0)))"),
     ["nets", ROOT],
     f"inputs.kicad_sch:80:13: coordinate -500000 mm is outside the sheet "
     f"(at most ±{MAX_COORDINATE_MM} mm)"),
    ("vector of 10^8 members", _append_to_inputs('\n (label "A[0..100000000]" (at 10 10 0))'),
     ["nets", ROOT],
     f"inputs.kicad_sch:80:2: bus 'A[0..100000000]' has more than {MAX_BUS_MEMBERS} members"),
    ("bus group of many vectors",
     _append_to_inputs('\n (label "{' + " ".join(f"D{i}[0..999]" for i in range(5)) +
                       '}" (at 10 10 0))'), ["nets", ROOT],
     "inputs.kicad_sch:80:2: bus '{D0[0..999] D1[0..999] D2[0..999] D3[0..'… has more than "
     f"{MAX_BUS_MEMBERS} members"),
    ("rail of 1e308 V", _write("r.toml", '[rails]\nVIN = "1e308V"\n'), RULES,
     "r.toml:2:1: rules key 'rails.VIN': cannot read '1e308V'; expected a voltage with its "
     "unit, such as 3V3, +5V, 1.8 V or 230VAC (the number is out of range)"),
    # --- rules keys that divide by zero or are impossible; wrong TOML types
    ("derating 0%", _write("r.toml", 'derating = "0%"\n'), RULES, DERATE + " at most 100%"),
    ("margin negative", _write("r.toml", 'margin = "-0.1V"\n'), RULES,
     "r.toml:1:1: rules key 'margin': '-0.1V' is impossible; expected a value that is not "
     "negative"),
    ("temperature min above max",
     _write("r.toml", '[temperature]\nmin = "80°C"\nmax = "10°C"\n'), RULES,
     "r.toml:3:1: rules key 'temperature.min' = '80°C' is above 'temperature.max' = '10°C'; "
     "expected temperature.min ≤ temperature.max"),
    ("preferred min above max", _write("r.toml", '[preferred]\nmin = "1M"\nmax = "1k"\n'), RULES,
     "r.toml:3:1: rules key 'preferred.min' = '1M' is above 'preferred.max' = '1k'; expected "
     "preferred.min ≤ preferred.max"),
    ("tolerance 150%", _write("r.toml", '[resistor]\ntolerance = "150%"\n'), RULES,
     "r.toml:2:1: rules key 'resistor.tolerance': '150%' is impossible; expected a value from "
     "0% to below 100%"),
    ("series as a list", _write("r.toml", 'series = ["E24"]\n'), RULES,
     "r.toml:1:1: rules key 'series': write one value as text, e.g. \"E24\", not a list"),
    ("levels as a number",
     _write("p.toml", '[part.X]\nmatch = ["*"]\nsupply = ["3V", "3.6V"]\nlevels = 5\n'),
     ["review", ROOT, "--parts", "p.toml"],
     "p.toml:4:1: field 'levels' of [part.X]: cannot read '5'; expected [[levels]] rows"),
    ("vih_min 1.7 VDD", _edit(PARTS, 'vih_min = "0.7 VDD"', 'vih_min = "1.7 VDD"'),
     ["review", ROOT],
     f"{PARTS}:30:1: field 'levels.vih_min' of [part.GENERIC-MCU33]: cannot read '1.7 VDD'; "
     "expected a fraction of the supply from 0 to 1, such as 0.7 VDD"),
    ("Power field 0W", _edit("inputs.kicad_sch", '"Tolerance" "1%"', '"Power" "0W"'),
     ["review", ROOT],
     "inputs.kicad_sch:64:298: field 'Power' of R13: cannot read '0W'; expected a power "
     "rating above zero"),
    # --- errors that used to name no file
    ("more than 10 000 sheet instances", _many_instances, ["nets", "many.kicad_sch"],
     "many.kicad_sch:101:2: more than 10,000 sheet instances"),
    ("bad part-library status", _edit(PARTS, 'status = "example"', 'status = "guess"'),
     ["review", ROOT],
     f"{PARTS}:19:1: field 'status' of [part.GENERIC-MCU33]: cannot read 'guess'; expected a "
     "status: confirmed, from memory, common practice, user, example, assumed"),
    # --- size limits, checked before parsing
    ("a 50 MB file", _sparse("big.kicad_sch", 50_000_000), ["nets", "big.kicad_sch"],
     "pullproof: cannot read big.kicad_sch: the file is 50 MB, above the limit of 10 MB "
     "(--max-file-size)"),
    ("a sheet above --max-file-size", _nothing, ["review", ROOT, "--max-file-size", "0.018"],
     "irrigation.kicad_sch:48:128: cannot read sheet file 'inputs.kicad_sch': the file is "
     "19,163 bytes, above the limit of 18,000 bytes (--max-file-size)"),
    ("the sheets above --max-total-size", _nothing, ["review", ROOT, "--max-total-size", "0.04"],
     "irrigation.kicad_sch:61:128: cannot read sheet file 'mains.kicad_sch': the files read so "
     "far and this one exceed the total limit of 0.04 MB (--max-total-size)"),
    # --- nothing of a file that is not a schematic; nothing outside the project folder
    ("sheet is /etc/passwd", _sheet_file("/etc/passwd"), ["review", ROOT],
     f"{AT_MAINS}: sheet file '/etc/passwd' is outside the folder of the root schematic; "
     "pass --allow-outside to read it"),
    ("sheet is /etc/passwd, allowed", _sheet_file("/etc/passwd"),
     ["review", ROOT, "--allow-outside"],
     "/etc/passwd:1:1: not a schematic: it does not start with '(kicad_sch'"),
    ("sheet is a secret in the folder", _env_file, ["review", ROOT],
     ".env:1:1: not a schematic: it does not start with '(kicad_sch'"),
    ("sheet leads out with ..", _sheet_file("../other/mains.kicad_sch"), ["nets", ROOT],
     f"{AT_MAINS}: sheet file '../other/mains.kicad_sch' is outside the folder of the root "
     "schematic; pass --allow-outside to read it"),
    ("sheet is a link out of the folder", _outside_link, ["review", ROOT],
     f"{AT_MAINS}: sheet file '{MAINS}' is outside the folder of the root schematic; pass "
     "--allow-outside to read it"),
    ("annotate a sheet outside", _sheet_file("/etc/hostname"), ["annotate", ROOT, "--write"],
     f"{AT_MAINS}: sheet file '/etc/hostname' is outside the folder of the root schematic; "
     "pass --allow-outside to read it"),
    ("a board file as a sheet", _board_as_sheet, ["review", ROOT],
     "board.kicad_pcb:1:1: not a schematic: it is a board file (kicad_pcb)"),
    ("a long bad word is cut short",
     _append_to_inputs("\n (wire " + "[" * 30 + "zzzzzzzzzzzzzzzzzzzz)"), ["nets", ROOT],
     "inputs.kicad_sch:80:8: unexpected character in bare word "
     "'[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[zzzzzzzzzz'…; quote it"),
]  # fmt: skip


@pytest.mark.parametrize(
    ("make", "argv", "line"), [c[1:] for c in CASES], ids=[c[0] for c in CASES]
)
def test_hostile_input_is_one_line_exit_2_and_leaves_files_alone(
    project: Path, make: Callable[[Path], None], argv: list[str], line: str
) -> None:
    make(project)
    before = digests(project)
    code, out, err = run(*argv)
    assert (code, err) == (2, line + "\n")
    assert out == ""
    assert digests(project) == before  # nothing written, no temporary file left


def test_a_wire_across_the_whole_sheet_range_joins_what_lies_on_it(tmp_path: Path) -> None:
    """A diagonal from corner to corner of the ±10 m range and a 20 m horizontal wire, read
    in bounded time: the label in the middle of the diagonal joins it, and the junction at
    the crossing joins both (the format's rule: a label or junction on a wire's interior
    joins that wire; crossing wires without a junction do not)."""
    from builder import SchematicBuilder

    lim = float(MAX_COORDINATE_MM)
    b = SchematicBuilder()
    b.resistor("R1", "10k", at=(lim, lim - 3.81))  # pin 2 at the diagonal's far end
    b.resistor("R2", "10k", at=(-lim, 3.81))  # pin 1 at the horizontal wire's left end
    b.wire((-lim, -lim), (lim, lim))
    b.wire((-lim, 0.0), (lim, 0.0))
    b.label("MIDDLE", at=(2.54, 2.54))
    b.junction((0.0, 0.0))
    root = b.write(tmp_path / "span.kicad_sch")
    code, _, err = run("nets", str(root), seconds=60)
    assert (code, err) == (0, "")
    nets = {n.name: {(m.ref, m.pin) for m in n.members} for n in build_circuit(root).nets}
    assert nets["/MIDDLE"] == {("R1", "2"), ("R2", "1")}


def test_the_environment_never_reaches_an_error_message(tmp_path: Path) -> None:
    """A sheet naming /proc/self/environ (a file whose size reads as 0) in a separate
    process holding a secret: refused as outside, and with --allow-outside refused as not a
    schematic, without a byte of it."""
    shutil.copytree(DEMO, tmp_path / "p")
    _sheet_file("/proc/self/environ")(tmp_path / "p")
    env = {**os.environ, "GREENHOUSE_SECRET": "s3cr3t-valve-key"}
    for extra, line in (
        ([], f"{AT_MAINS}: sheet file '/proc/self/environ' is outside the folder of the root "
             "schematic; pass --allow-outside to read it"),
        (["--allow-outside"],
         "/proc/self/environ:1:1: not a schematic: it does not start with '(kicad_sch'"),
    ):  # fmt: skip
        proc = subprocess.run(
            [sys.executable, "-m", "pullproof", "review", ROOT, *extra],
            cwd=tmp_path / "p", env=env, capture_output=True, text=True, timeout=120,
        )  # fmt: skip
        assert (proc.returncode, proc.stderr, proc.stdout) == (2, line + "\n", "")
        assert "s3cr3t" not in proc.stderr + proc.stdout


def test_lists_and_words_are_counted_over_all_files(
    project: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """A smaller budget for the whole review stands in for six million lists and words."""
    monkeypatch.setattr(InputPolicy, "tokens", lambda self: TokenBudget(total=9000))
    before = digests(project)
    code, out, err = run("nets", ROOT)
    assert (code, out) == (2, "")
    assert err == (
        "mains.kicad_sch:21:31: the files read so far and this one hold more than 9,000 lists "
        "and words\n"
    )
    assert digests(project) == before


def test_token_limits_grow_with_the_size_limits_and_never_shrink() -> None:
    # A larger --max-file-size admits a larger board of real text (about 0.2 lists and words
    # per byte), so the token limits follow it in proportion; below the defaults they stay.
    default = InputPolicy().tokens()
    assert (default.per_file, default.total) == (MAX_TOKENS_PER_FILE, MAX_TOKENS_TOTAL)
    big = InputPolicy(max_file_bytes=100_000_000, max_total_bytes=250_000_000).tokens()
    assert (big.per_file, big.total) == (10 * MAX_TOKENS_PER_FILE, 10 * MAX_TOKENS_TOTAL)
    small = InputPolicy(max_file_bytes=1_000, max_total_bytes=1_000).tokens()
    assert (small.per_file, small.total) == (MAX_TOKENS_PER_FILE, MAX_TOKENS_TOTAL)


def test_a_bad_size_option_is_a_usage_error(project: Path) -> None:
    code, out, err = run("review", ROOT, "--max-file-size", "0")
    assert code == 2 and out == ""
    assert err.rstrip().endswith("argument --max-file-size: expected a size in MB above 0, got '0'")
