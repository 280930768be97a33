"""The shipped demo: a greenhouse irrigation controller, copied out, reviewed and written up.

``write_demo(DIR)`` copies the demo schematic (root plus sub-sheets), its rules file
and its part library into ``DIR``, reviews it and writes the design note
``DIR/irrigation-note.html``. The demo files ship inside the wheel as
``pullproof/demo_data``; a source checkout reads them from ``fixtures/demo``.
Existing files are never overwritten unless ``force`` is given, and nothing is
written until every target has been checked.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from importlib import resources
from importlib.resources.abc import Traversable
from pathlib import Path

from .errors import PullproofError
from .results import ReviewResult

__all__ = ["DEFAULT_DIR", "DEMO_ROOT", "DemoError", "DemoOutput", "demo_files", "write_demo"]

DEMO_ROOT = "irrigation.kicad_sch"
DEFAULT_DIR = "pullproof-demo"
DEMO_TITLE = "Pull resistor design note: greenhouse irrigation controller (demo)"
_SUFFIXES = (".kicad_sch", ".toml")  # what belongs to the demo; anything else is left out


class DemoError(PullproofError):
    """The demo cannot be written where asked (a file in the way, no permission …)."""


@dataclass(frozen=True)
class DemoOutput:
    """What :func:`write_demo` wrote: the copied files, the note, and the review behind it."""

    root: Path
    files: tuple[Path, ...]
    note: Path
    result: ReviewResult


def _data_dir() -> Traversable:
    """The demo files: installed package data, else the source checkout's fixtures/demo."""
    installed = resources.files("pullproof").joinpath("demo_data")
    if installed.joinpath(DEMO_ROOT).is_file():
        return installed
    checkout = Path(__file__).resolve().parents[2] / "fixtures" / "demo"
    if (checkout / DEMO_ROOT).is_file():
        return checkout
    raise DemoError("the demo files are missing from this installation (pullproof/demo_data)")


def demo_files() -> tuple[Traversable, ...]:
    """The demo's files (schematic sheets, rules file, part library), sorted by name."""
    found = [f for f in _data_dir().iterdir() if f.is_file() and f.name.endswith(_SUFFIXES)]
    return tuple(sorted(found, key=lambda f: f.name))


def _prepare(directory: Path) -> None:
    if directory.exists() and not directory.is_dir():
        raise DemoError(f"{directory}: is a file, not a folder; choose another folder for the demo")
    try:
        directory.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise DemoError(f"{directory}: cannot create the folder ({exc.strerror})") from None
    if not os.access(directory, os.W_OK | os.X_OK):
        raise DemoError(f"{directory}: folder is not writable")


def write_demo(
    directory: str | os.PathLike[str] = DEFAULT_DIR, *, force: bool = False
) -> DemoOutput:
    """Copy the demo into ``directory``, review it and write its design note there.

    Args:
        directory: where to put the demo (created when missing).
        force: overwrite demo files (and the note) left there by an earlier run.

    Raises:
        DemoError: ``directory`` is a file or not writable, or a target file exists and
            ``force`` is not given (nothing is written then).
        PullproofError: the review or the note failed.
    """
    from .report.note import write_note
    from .review import review

    target = Path(directory)
    sources = demo_files()
    note = target / f"{Path(DEMO_ROOT).stem}-note.html"
    _prepare(target)
    outputs = [target / f.name for f in sources]
    if not force:
        taken = [p for p in (*outputs, note) if p.exists() or p.is_symlink()]
        if taken:
            more = f" (and {len(taken) - 1} more)" if len(taken) > 1 else ""
            raise DemoError(f"{taken[0]}: already exists{more}; use --force to overwrite")
    for src, dst in zip(sources, outputs, strict=True):
        if dst.is_dir():
            raise DemoError(f"{dst}: is a folder; remove it or choose another folder")
        try:
            dst.write_bytes(src.read_bytes())
        except OSError as exc:
            raise DemoError(f"{dst}: cannot write ({exc.strerror})") from None
    result = review(target / DEMO_ROOT)
    write_note(result, note, title=DEMO_TITLE, author="pullproof demo")
    return DemoOutput(target / DEMO_ROOT, tuple(outputs), note, result)
