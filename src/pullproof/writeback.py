"""Replacing a user's files safely: all or nothing, owner and mode kept, nothing left behind.

Every new text goes to a temporary file ``.NAME.pullproof-XXXXXXXX.tmp`` in the file's own
folder, with the original's mode, owner and group. Only when every temporary file is
written are the originals replaced (``os.replace``, atomic on one file system), each right
after its content digest is checked once more. A failure or an interruption part-way puts
the original text back into the files already replaced and removes every temporary file;
after a kill (which no program can intercept) the next run finds its own stale temporary
files by their name and removes them.

What is refused before anything is written: a file without any write permission bit
(also for an administrator, who could otherwise write anyway), a file with more than one
hard link (a replacement would leave the other names with the old text), a file whose
owner or group could not be kept, and a file that changed since it was read.

The remaining window: between the last digest check and the replacement of one file
(a few system calls) another program could still write that file, and its change would be
lost; an editor that writes in place during that moment is not detected.
"""

from __future__ import annotations

import contextlib
import hashlib
import os
import re
import stat
import tempfile
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path

from .errors import AnnotateError

__all__ = ["TEMP_TAG", "Replacement", "remove_stale", "replace_all", "stale_temporaries"]

TEMP_TAG = ".pullproof-"  # in every temporary file's name: .NAME.pullproof-XXXXXXXX.tmp
_TEMP_RANDOM = re.compile(r"[A-Za-z0-9_]{8}")  # what tempfile puts between prefix and suffix


@dataclass(frozen=True)
class Replacement:
    """One file to replace: its absolute path, the bytes read earlier and the new bytes."""

    path: str
    old: bytes
    new: bytes
    backup: bool = False  # keep the old bytes as PATH.bak


@dataclass(frozen=True)
class _State:
    """What is kept from the original: mode bits, owner, group."""

    mode: int
    uid: int
    gid: int


def _digest(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def _temp_prefix(path: str) -> str:
    return f".{os.path.basename(path)}{TEMP_TAG}"


def stale_temporaries(paths: Iterable[str]) -> tuple[str, ...]:
    """Temporary files an interrupted run left beside any of ``paths`` (regular files only)."""
    found: set[str] = set()
    for path in paths:
        folder, prefix = os.path.dirname(path), _temp_prefix(path)
        with contextlib.suppress(OSError):
            for entry in os.scandir(folder):
                name = entry.name
                if not (name.startswith(prefix) and name.endswith(".tmp")):
                    continue
                middle = name[len(prefix) : -len(".tmp")]
                if _TEMP_RANDOM.fullmatch(middle) and entry.is_file(follow_symlinks=False):
                    found.add(entry.path)
    return tuple(sorted(found))


def remove_stale(temps: Iterable[str]) -> tuple[str, ...]:
    """Remove stale temporary files; return those removed."""
    removed = []
    for t in temps:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(t)
            removed.append(t)
    return tuple(removed)


def _check(path: str, *, what: str = "the file") -> _State:
    """The state to keep; refuses a read-only, multiply linked or foreign-owned file."""
    try:
        st = os.lstat(path)
    except OSError as exc:
        raise AnnotateError(
            f"{path}: cannot read {what}: {exc.strerror}; nothing written"
        ) from None
    if not stat.S_ISREG(st.st_mode):
        raise AnnotateError(f"{path}: {what} is not a regular file; nothing written")
    if not st.st_mode & 0o222 or not os.access(path, os.W_OK):
        raise AnnotateError(f"{path}: {what} is read-only; nothing written")
    if st.st_nlink > 1:
        raise AnnotateError(
            f"{path}: {what} has {st.st_nlink} hard links; replacing it would leave the other "
            "names with the old text; nothing written"
        )
    euid = os.geteuid() if hasattr(os, "geteuid") else st.st_uid
    if euid not in (0, st.st_uid):
        raise AnnotateError(
            f"{path}: {what} belongs to another user (uid {st.st_uid}) and its owner could "
            "not be kept; nothing written"
        )
    return _State(stat.S_IMODE(st.st_mode), st.st_uid, st.st_gid)


def _current(path: str) -> bytes | None:
    try:
        return Path(path).read_bytes()
    except OSError:
        return None


def _write_temp(path: str, data: bytes, state: _State) -> str:
    """A temporary file beside ``path`` holding ``data``, with ``state``'s mode and owner."""
    fd, tmp = tempfile.mkstemp(prefix=_temp_prefix(path), suffix=".tmp", dir=os.path.dirname(path))
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
            st = os.fstat(fh.fileno())
            if (st.st_uid, st.st_gid) != (state.uid, state.gid) and hasattr(os, "fchown"):
                os.fchown(fh.fileno(), state.uid, state.gid)
            os.fchmod(fh.fileno(), state.mode)
    except BaseException:
        _discard([tmp])
        raise
    return tmp


def _discard(paths: Iterable[str]) -> None:
    for p in paths:
        with contextlib.suppress(OSError):  # already gone; nothing of the user's is at stake
            os.unlink(p)


def _sync_folder(path: str) -> None:
    with contextlib.suppress(OSError, AttributeError):
        fd = os.open(os.path.dirname(path) or ".", os.O_RDONLY)
        try:
            os.fsync(fd)
        finally:
            os.close(fd)


def replace_all(items: Sequence[Replacement]) -> None:
    """Replace every file of ``items`` or none of them.

    Raises:
        AnnotateError: a file is read-only, hard-linked, foreign-owned, changed since it
            was read, or cannot be written; every original is left (or put back) as it was.
        KeyboardInterrupt: re-raised after the same clean-up.
    """
    states = []
    for it in items:
        states.append(_check(it.path))
        if it.backup and os.path.lexists(it.path + ".bak"):
            _check(it.path + ".bak", what="the backup file")
        if _current(it.path) != it.old:
            raise AnnotateError(f"{it.path}: the file changed since it was read; nothing written")
    temps: list[tuple[Replacement, str, str | None]] = []
    done: list[tuple[Replacement, _State]] = []
    try:
        try:
            for it, state in zip(items, states, strict=True):
                new = _write_temp(it.path, it.new, state)
                temps.append((it, new, None))
                if it.backup:
                    temps[-1] = (it, new, _write_temp(it.path, it.old, state))
        except OSError as exc:
            raise AnnotateError(f"{exc.filename or 'a temporary file'}: cannot write: "
                                f"{exc.strerror or exc}; nothing written") from None  # fmt: skip
        for (it, new, bak), state in zip(temps, states, strict=True):
            if _digest(_current(it.path) or b"") != _digest(it.old):
                raise AnnotateError(
                    f"{it.path}: the file changed while pullproof was writing; nothing written"
                )
            try:
                if bak is not None:
                    os.replace(bak, it.path + ".bak")
                os.replace(new, it.path)
            except OSError as exc:
                reason = exc.strerror or str(exc)
                raise AnnotateError(
                    f"{it.path}: cannot replace the file: {reason}; nothing written"
                ) from None
            done.append((it, state))
            _sync_folder(it.path)
    except BaseException:
        _discard(t for _, new, bak in temps for t in (new, bak) if t is not None)
        _restore(done)
        raise


def _restore(done: Sequence[tuple[Replacement, _State]]) -> None:
    """Put the original bytes back into files already replaced (best effort, atomically)."""
    for it, state in done:
        with contextlib.suppress(OSError):  # the caller's error names the failure
            os.replace(_write_temp(it.path, it.old, state), it.path)
