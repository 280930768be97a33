"""Write-back safety: ``annotate --write`` refuses read-only and hard-linked files (also as
root), keeps owner, group and mode, checks each file's digest right before replacing it,
leaves no temporary file after any interruption (a kill included: the next run removes what
it left and says so), and ``--remove`` gives back every file byte for byte.

The project is a copy of the demo (an invented greenhouse irrigation controller).
"""

from __future__ import annotations

import dataclasses
import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from conftest import REALWORLD
from hostile import digests, run
from pullproof import writeback
from pullproof.annotate import AnnotateError, apply_annotation, plan_annotation
from pullproof.limits import InputPolicy

ROOT = "irrigation.kicad_sch"


@pytest.fixture
def demo(project: Path) -> Path:
    return project


def _temporaries(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


def _refused(folder: Path, line: str, *extra: str) -> None:
    before = digests(folder)
    code, out, err = run("annotate", ROOT, "--write", *extra)
    assert (code, out, err) == (2, "", line + "\n")
    assert digests(folder) == before  # every file as it was, no temporary file left


def test_a_read_only_file_is_refused_even_as_root(demo: Path) -> None:
    """Mode 0444 and run as whoever runs the tests (root in CI: the OS alone would allow
    the write; the mode bits decide)."""
    sensors = demo / "sensors.kicad_sch"
    sensors.chmod(0o444)
    _refused(demo, f"pullproof: {sensors.resolve()}: the file is read-only; nothing written")


def test_a_hard_link_is_refused(demo: Path) -> None:
    inputs = demo / "inputs.kicad_sch"
    os.link(inputs, demo.parent / "inputs-copy.kicad_sch")
    _refused(demo, f"pullproof: {inputs.resolve()}: the file has 2 hard links; replacing it "
                   "would leave the other names with the old text; nothing written")  # fmt: skip


@pytest.mark.skipif(os.geteuid() != 0, reason="only root can give a file another owner")
def test_owner_group_and_mode_are_kept(demo: Path) -> None:
    inputs = demo / "inputs.kicad_sch"
    os.chown(inputs, 4321, 8765)
    inputs.chmod(0o640)
    code, _, err = run("annotate", ROOT, "--write")
    assert (code, err) == (0, "")
    st = inputs.stat()
    assert (st.st_uid, st.st_gid, st.st_mode & 0o7777) == (4321, 8765, 0o640)
    assert b"pullproof.verdict" in inputs.read_bytes()


def test_a_change_while_writing_is_caught_before_the_replace(
    demo: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """Another program writes a schematic after pullproof's temporary files are written:
    the digest taken right before each replace sees it, and nothing is replaced."""
    plan = plan_annotation(ROOT)
    first = next(e.path for e in plan.edits if e.changed)
    real = writeback._write_temp
    count = sum(e.changed for e in plan.edits)
    calls: list[str] = []

    def write_then_meddle(path: str, data: bytes, state: object) -> str:
        tmp = real(path, data, state)  # type: ignore[arg-type]
        calls.append(path)
        if len(calls) == count:  # the last temporary file is written
            with open(first, "ab") as fh:
                fh.write(b"\n")
        return tmp

    monkeypatch.setattr(writeback, "_write_temp", write_then_meddle)
    before = digests(demo)
    with pytest.raises(AnnotateError) as info:
        apply_annotation(plan)
    assert str(info.value) == (
        f"{first}: the file changed while pullproof was writing; nothing written"
    )
    after = digests(demo)
    changed = {name for name in after if after[name] != before.get(name)}
    assert changed == {os.path.basename(first)}  # only the other program's edit
    assert _temporaries(demo) == []


# The child pauses at its first replace, after every temporary file is written.
_PAUSING_CHILD = """
import os, sys, time
flag = sys.argv[1]
def paused(src, dst):
    open(flag, "w").close()
    time.sleep(120)
os.replace = paused
from pullproof.cli import main
sys.exit(main(sys.argv[2:]))
"""


def _start_paused(folder: Path, *argv: str) -> subprocess.Popen[str]:
    flag = folder.parent / "paused"
    child = subprocess.Popen(
        [sys.executable, "-c", _PAUSING_CHILD, str(flag), *argv],
        cwd=folder, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
    )  # fmt: skip
    deadline = time.monotonic() + 60
    while not flag.exists():
        assert child.poll() is None, child.communicate()
        assert time.monotonic() < deadline, "the child never reached the replace"
        time.sleep(0.05)
    return child


def test_a_kill_during_the_write_leaves_the_files_and_the_next_run_cleans_up(demo: Path) -> None:
    before = digests(demo)
    child = _start_paused(demo, "annotate", ROOT, "--write")
    child.kill()  # SIGKILL: no program can clean up after this
    child.communicate(timeout=60)
    stale = _temporaries(demo)
    assert len(stale) == 4  # one per schematic file, left by the killed run
    assert all(name.startswith(".") and ".kicad_sch.pullproof-" in name for name in stale)
    assert {k: v for k, v in digests(demo).items() if not k.endswith(".tmp")} == before

    code, out, err = run("annotate", ROOT)  # a dry run reports them and keeps them
    assert (code, err) == (0, "")
    assert f"found (--write removes it) a temporary file left by an interrupted run: " \
           f"{demo / stale[0]}" in out  # fmt: skip
    code, out, err = run("annotate", ROOT, "--write")
    assert (code, err) == (0, "")
    for name in stale:
        assert f"removed a temporary file left by an interrupted run: {demo / name}" in out
    assert _temporaries(demo) == []
    assert b"pullproof.verdict" in (demo / "inputs.kicad_sch").read_bytes()


def test_a_termination_signal_during_the_write_rolls_back(demo: Path) -> None:
    before = digests(demo)
    child = _start_paused(demo, "annotate", ROOT, "--write")
    child.send_signal(signal.SIGTERM)
    _, err = child.communicate(timeout=60)
    assert child.returncode == 128 + signal.SIGTERM
    assert err == "pullproof: interrupted; nothing was left half-written\n"
    assert digests(demo) == before  # originals untouched, temporary files removed


def test_remove_gives_back_the_files_byte_for_byte(demo: Path) -> None:
    before = digests(demo)
    assert run("annotate", ROOT, "--write")[0] == 0
    assert digests(demo) != before
    code, out, err = run("annotate", ROOT, "--remove")  # dry run: lists, writes nothing
    assert (code, err) == (0, "")
    assert "  R12      remove  pullproof.verdict      (was fail; removed on request)" in out
    # five result fields on each of the demo's 12 judged resistors
    assert out.rstrip().endswith("would write 0 new, 0 changed and 60 removed fields on 12 "
                                 "symbols in 4 files")  # fmt: skip
    code, out, err = run("annotate", ROOT, "--remove", "--write")
    assert (code, err) == (0, "")
    assert digests(demo) == before
    code, out, _ = run("annotate", ROOT, "--remove", "--write")
    assert "no result fields to remove; nothing to write" in out


@pytest.mark.skipif(not REALWORLD.is_dir(), reason="the real-world corpus is not beside the repo")
def test_remove_restores_a_real_format_10_design(tmp_path: Path) -> None:
    """europi is written by the editor in format 10 (tabs, one list per line)."""
    shutil.copytree(REALWORLD / "europi", tmp_path / "europi")
    root = tmp_path / "europi" / "europi-surface-mount.kicad_sch"
    root.chmod(0o644)  # the corpus is read-only; a user's copy is writable
    before = root.read_bytes()
    assert run("annotate", str(root), "--write")[0] == 0
    assert root.read_bytes() != before
    assert run("annotate", str(root), "--remove", "--write")[0] == 0
    assert root.read_bytes() == before


def test_backup_keeps_the_file_as_it_was(demo: Path) -> None:
    inputs = demo / "inputs.kicad_sch"
    inputs.chmod(0o640)
    original = inputs.read_bytes()
    assert run("annotate", ROOT, "--write")[0] == 0
    assert not (demo / "inputs.kicad_sch.bak").exists()  # only on request
    assert run("annotate", ROOT, "--remove", "--write", "--backup")[0] == 0
    backup = demo / "inputs.kicad_sch.bak"
    assert backup.read_bytes() != original and b"pullproof.verdict" in backup.read_bytes()
    assert inputs.read_bytes() == original
    assert backup.stat().st_mode & 0o777 == 0o640
    assert _temporaries(demo) == []


def test_nothing_outside_the_root_folder_is_written(demo: Path) -> None:
    """The plan remembers how its sheets were read; a plan for sheets inside the folder
    cannot be turned into one that writes elsewhere."""
    outside = demo.parent / "shared-sheets"
    outside.mkdir()
    (demo / "mains.kicad_sch").rename(outside / "mains.kicad_sch")
    text = (demo / ROOT).read_text(encoding="utf-8")
    moved = text.replace(
        '"Sheetfile" "mains.kicad_sch"', f'"Sheetfile" "{outside}/mains.kicad_sch"'
    )
    (demo / ROOT).write_text(moved, encoding="utf-8")
    plan = plan_annotation(ROOT, policy=InputPolicy(allow_outside=True))
    with pytest.raises(AnnotateError, match="outside the folder of the root schematic"):
        apply_annotation(dataclasses.replace(plan, allow_outside=False))
    apply_annotation(plan)  # read with --allow-outside: the user asked for it
    assert b"pullproof.verdict" in (outside / "mains.kicad_sch").read_bytes()
