"""Read a user's text file (rules, part library) as UTF-8, with positioned errors; write
a report (note, SARIF log) atomically.

A byte-order mark is dropped (editors on some systems write one); bytes that are
not UTF-8 are reported at their line and column instead of as a codec message.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Iterable
from pathlib import Path

from .errors import PullproofError, SourceText

__all__ = ["read_utf8", "write_report"]


def write_report(path: str | os.PathLike[str], text: str, what: str, inputs: Iterable[str]) -> None:
    """Write ``text`` to ``path`` atomically: a temporary file in the same folder replaces
    it, so a failure never leaves half a file. ``what`` names the report in messages.

    Raises:
        PullproofError: ``path`` is one of ``inputs`` (a file the review read), or it
            cannot be written.
    """
    target = Path(path)
    if os.path.realpath(target) in {os.path.realpath(p) for p in inputs}:
        raise PullproofError(f"{target}: refusing to write the {what} over an input of the review")
    folder = target.parent if str(target.parent) else Path(".")
    tmp_name = ""
    try:
        with tempfile.NamedTemporaryFile(
            "w",
            encoding="utf-8",
            dir=folder,
            prefix=f".{target.name}.",
            suffix=".tmp",
            delete=False,
        ) as tmp:
            tmp_name = tmp.name
            tmp.write(text)
            tmp.flush()
            os.fsync(tmp.fileno())
        os.replace(tmp_name, target)
    except OSError as e:
        if tmp_name and os.path.exists(tmp_name):
            os.unlink(tmp_name)
        raise PullproofError(f"{target}: cannot write the {what} ({e.strerror or e})") from None


def read_utf8(path: Path, error: type[PullproofError], what: str) -> str:
    """Return the text of ``path``; ``what`` names the file's role in messages.

    Raises:
        error: the file cannot be opened, or is not UTF-8 text (positioned).
    """
    try:
        data = Path(path).read_bytes()
    except OSError as exc:
        raise error(f"cannot read {what} {path}: {exc.strerror}") from None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        head = data[: exc.start].decode("utf-8", errors="replace")
        loc = SourceText(str(path), head).locate(len(head))
        raise error(f"the {what} is not UTF-8 text", loc) from None
    return text.removeprefix("\ufeff")
