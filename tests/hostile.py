"""Helpers for the hostile-input tests: run the CLI in-process, bound a case in time, digest
a folder, and find raw control characters.

A case that takes longer than its bound raises :class:`Hang` from a timer signal, so a
regression that loops or blocks (a FIFO, ``/dev/zero``) fails the test instead of stopping
the suite. The bound is a hang detector, not a speed goal (those are in ``benchmark.py``).
"""

from __future__ import annotations

import contextlib
import hashlib
import io
import signal
import unicodedata
from collections.abc import Iterator
from pathlib import Path

from pullproof.cli import main

__all__ = ["Hang", "bounded", "digests", "raw_controls", "run"]


class Hang(BaseException):
    """A case ran past its time bound (a BaseException, so no `except Exception` hides it)."""


@contextlib.contextmanager
def bounded(seconds: float) -> Iterator[None]:
    """Raise :class:`Hang` inside the block when it runs longer than ``seconds``."""

    def alarm(signum: int, frame: object) -> None:
        raise Hang(f"no answer within {seconds:g} s")

    old = signal.signal(signal.SIGALRM, alarm)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)


def run(*argv: str, seconds: float = 60) -> tuple[int, str, str]:
    """``pullproof ARGV`` in this process: (exit code, stdout, stderr)."""
    out, err = io.StringIO(), io.StringIO()
    with bounded(seconds), contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = main(list(argv))
        except SystemExit as exc:  # argparse: a bad option
            code = exc.code if isinstance(exc.code, int) else 2
    return code, out.getvalue(), err.getvalue()


def digests(folder: Path) -> dict[str, str]:
    """Every file below ``folder`` (temporary files included) with its SHA-256."""
    return {
        str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*"))
        if p.is_file() and not p.is_symlink()
    }


def raw_controls(text: str, keep: str = "\n") -> list[str]:
    """The control, format (bidi) and separator characters in ``text``, except ``keep``."""
    return sorted(
        {
            ch
            for ch in text
            if ch not in keep and unicodedata.category(ch) in {"Cc", "Cf", "Cs", "Zl", "Zp"}
        }
    )
