"""Read a user's text file (rules, part library) as UTF-8, with positioned errors.

A byte-order mark is dropped (editors on some systems write one); bytes that are
not UTF-8 are reported at their line and column instead of as a codec message.
"""

from __future__ import annotations

from pathlib import Path

from .errors import PullproofError, SourceText

__all__ = ["read_utf8"]


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
