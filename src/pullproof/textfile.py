"""Read a user's file safely (regular files only, size-limited, UTF-8 with positioned
errors); write a report (note, SARIF log) atomically.

A name in a schematic or on the command line may point anywhere: at a FIFO that never
ends, at ``/dev/zero``, at a folder, a symbolic-link loop or a file of gigabytes. Only a
regular file is opened (non-blocking, so a FIFO swapped in at the last moment cannot hang
the open), its size is checked before a byte is read, and no more than the limit is
ever read. A byte-order mark is dropped from rules and part libraries (editors on some
systems write one); bytes that are not UTF-8 are reported at their line and column,
never quoted.
"""

from __future__ import annotations

import contextlib
import errno
import os
import stat
import tempfile
from collections.abc import Iterable
from itertools import islice
from pathlib import Path

from .errors import PullproofError, SourceText
from .limits import MAX_TEXT_FILE_BYTES

__all__ = ["Unreadable", "decode_utf8", "read_regular", "read_utf8", "write_report"]


class Unreadable(Exception):
    """A file that cannot or must not be read; ``reason`` says why in a few words."""

    def __init__(self, reason: str, *, too_large: bool = False) -> None:
        super().__init__(reason)
        self.reason = reason
        self.too_large = too_large


def _kind(mode: int) -> str | None:
    """Why a file of this mode is refused, or None for a regular file."""
    if stat.S_ISREG(mode):
        return None
    if stat.S_ISDIR(mode):
        return os.strerror(errno.EISDIR)
    if stat.S_ISFIFO(mode):
        return "not a regular file (a named pipe)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "not a regular file (a device)"
    if stat.S_ISSOCK(mode):
        return "not a regular file (a socket)"
    return "not a regular file"


def _size_text(n: int) -> str:
    return f"{n / 1e6:.3g} MB" if n >= 1_000_000 else f"{n:,} bytes"


def read_regular(path: str | os.PathLike[str], max_bytes: int) -> bytes:
    """The bytes of the regular file ``path``, at most ``max_bytes`` of them.

    Raises:
        Unreadable: the file is missing, not a regular file, larger than ``max_bytes``,
            or its name cannot be used (too long, a NUL character).
    """
    name = os.fspath(path)
    if "\x00" in name:
        raise Unreadable("the file name contains a NUL character")
    try:
        before = os.stat(name)
        kind = _kind(before.st_mode)
        if kind is not None:
            raise Unreadable(kind)
        if before.st_size > max_bytes:
            raise Unreadable(_too_large(before.st_size, max_bytes), too_large=True)
        flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)
        fd = os.open(name, flags | getattr(os, "O_CLOEXEC", 0))
    except OSError as exc:
        raise Unreadable(exc.strerror or str(exc)) from None
    try:
        kind = _kind(os.fstat(fd).st_mode)  # the file opened may differ from the one checked
        if kind is not None:
            raise Unreadable(kind)
        chunks: list[bytes] = []
        got = 0
        while got <= max_bytes:  # st_size can be 0 for files that still hold data
            chunk = os.read(fd, min(1 << 20, max_bytes + 1 - got))
            if not chunk:
                break
            chunks.append(chunk)
            got += len(chunk)
        if got > max_bytes:
            raise Unreadable(_too_large(got, max_bytes), too_large=True)
        return b"".join(chunks)
    except OSError as exc:
        raise Unreadable(exc.strerror or str(exc)) from None
    finally:
        os.close(fd)


def _too_large(size: int, limit: int) -> str:
    shown = f"more than {_size_text(limit)}" if size == limit + 1 else _size_text(size)
    return f"the file is {shown}, above the limit of {_size_text(limit)}"


def decode_utf8(data: bytes, name: str, error: type[PullproofError], what: str) -> str:
    """``data`` as text; bytes that are not UTF-8 are reported at their line and column.

    Raises:
        error: "NAME:LINE:COL: the WHAT is not UTF-8 text" (the bytes are never quoted).
    """
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        head = data[: exc.start].decode("utf-8", errors="replace")
        loc = SourceText(name, head).locate(len(head))
        raise error(f"the {what} is not UTF-8 text", loc) from None


def read_utf8(path: Path, error: type[PullproofError], what: str) -> str:
    """Return the text of ``path``; ``what`` names the file's role in messages.

    Raises:
        error: the file cannot be opened, is not a regular file, is larger than
            :data:`~pullproof.limits.MAX_TEXT_FILE_BYTES`, or is not UTF-8 text (positioned).
    """
    try:
        data = read_regular(path, MAX_TEXT_FILE_BYTES)
    except Unreadable as exc:
        raise error(f"cannot read {what} {path}: {exc.reason}") from None
    return decode_utf8(data, str(path), error, what).removeprefix("\ufeff")


def write_report(
    path: str | os.PathLike[str], text: str | Iterable[str], what: str, inputs: Iterable[str]
) -> None:
    """Write ``text`` (a string, or its pieces in order) to ``path`` atomically: a temporary
    file in the same folder replaces it, so a failure never leaves half a file. ``what``
    names the report in messages. Pieces are written as they come, a few thousand joined at
    a time, so a large report is never one string in memory; an error while they are made
    removes the temporary file and leaves ``path`` as it was.

    Raises:
        PullproofError: ``path`` is one of ``inputs`` (a file the review read), or it
            cannot be written.
    """
    target = Path(path)
    if os.path.realpath(target) in {os.path.realpath(p) for p in inputs}:
        raise PullproofError(f"{target}: refusing to write the {what} over an input of the review")
    with contextlib.suppress(OSError):  # a missing target is the usual case
        kind = _kind(os.stat(target).st_mode)
        if kind is not None:  # never replace a device, a FIFO or a folder with a report
            raise PullproofError(f"{target}: cannot write the {what} ({kind})")
    folder = target.parent if str(target.parent) else Path(".")
    tmp_name = ""
    replaced = False
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
            if isinstance(text, str):
                tmp.write(text)
            else:
                pieces = iter(text)
                while chunk := list(islice(pieces, 4096)):
                    tmp.write("".join(chunk))
            tmp.flush()
            os.fsync(tmp.fileno())
        os.replace(tmp_name, target)
        replaced = True
    except OSError as e:
        raise PullproofError(f"{target}: cannot write the {what} ({e.strerror or e})") from None
    finally:
        if not replaced and tmp_name and os.path.exists(tmp_name):
            os.unlink(tmp_name)
