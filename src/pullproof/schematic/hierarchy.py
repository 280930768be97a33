"""Loading a root schematic and every sheet it uses, as a list of sheet instances.

A sheet used twice is read once and instanced twice. Errors name the parent's
``Sheetfile`` property when a sub-sheet is missing, unreadable, outside the project
folder or includes itself. What may be read is set by an
:class:`~pullproof.limits.InputPolicy`: a size limit per file and in total, checked
before a file is parsed, and sheet references that stay inside the root's folder.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from ..errors import Location, SchematicError, SourceText, excerpt
from ..limits import (
    MAX_EXPANDED_ITEMS,
    MAX_INSTANCES,
    MAX_SHEET_DEPTH,
    InputPolicy,
)
from ..textfile import Unreadable
from .model import SchematicFile, SheetBlock
from .reader import read_path

__all__ = ["MAX_INSTANCES", "Hierarchy", "Instance", "load_hierarchy"]


@dataclass(frozen=True)
class Instance:
    """One sheet instance: its readable path ("/", "/PSU/"), file key and uuid paths."""

    index: int
    path: str
    file: str  # key into Hierarchy.files (relative to the root's folder)
    name: str
    uuid_path: str  # "/root-uuid/sheet-uuid…" as v7+ `instances` write it
    v6_path: str  # "/sheet-uuid…" as the v6 root's `symbol_instances` write it
    parent: int  # index of the parent instance, -1 for the root
    block: int  # index of the sheet block in the parent file, -1 for the root


@dataclass(frozen=True)
class Hierarchy:
    """The root, every file read (by key) with its text, and the instances in pre-order."""

    root_key: str
    models: dict[str, SchematicFile]
    texts: dict[str, SourceText]
    absolute: dict[str, str]
    instances: tuple[Instance, ...]


def _items(model: SchematicFile) -> int:
    """The work every instance of one file repeats: placed symbols with their pins and
    instance paths, labels, sheet pins, wires and junctions."""
    libs = model.lib_symbols
    symbols = sum(
        1 + len(sym.instances) + (len(lib.pins) if (lib := libs.get(sym.lib_key)) else 0)
        for sym in model.symbols
    )
    sheets = sum(1 + len(b.pins) for b in model.sheets)
    return 1 + symbols + sheets + len(model.labels) + len(model.wires) + len(model.junctions)


def _inside(path: str, folder: str) -> bool:
    return os.path.commonpath([path, folder]) == folder


class _Loader:
    """Reads files under one policy, keeping the running total of bytes read."""

    def __init__(self, root: str | os.PathLike[str], policy: InputPolicy) -> None:
        self.policy = policy
        self.display_root = os.fspath(root)
        self.root_path = Path(root)
        self.total = 0
        self.tokens = policy.tokens()
        self.models: dict[str, SchematicFile] = {}
        self.texts: dict[str, SourceText] = {}
        self.absolute: dict[str, str] = {}
        self.instances: list[Instance] = []
        self.expanded = 0
        self.sizes: dict[str, int] = {}

    def read(self, path: Path, display: str) -> tuple[SchematicFile, str]:
        """Read one file within the limits; :class:`Unreadable` says why not."""
        budget = min(self.policy.max_file_bytes, self.policy.max_total_bytes - self.total)
        try:
            model, text = read_path(path, display, max(budget, 0), self.tokens)
        except Unreadable as exc:
            if exc.too_large and budget < self.policy.max_file_bytes:
                limit = self.policy.max_total_bytes / 1e6
                raise Unreadable(
                    f"the files read so far and this one exceed the total limit of "
                    f"{limit:.3g} MB (--max-total-size)"
                ) from None
            if exc.too_large:
                raise Unreadable(f"{exc.reason} (--max-file-size)") from None
            raise
        self.total += len(text.encode("utf-8"))
        return model, text

    def root(self) -> str:
        try:
            model, text = self.read(self.root_path, self.display_root)
        except Unreadable as exc:
            raise SchematicError(f"cannot read {self.display_root}: {exc.reason}") from None
        key = self.root_path.name
        self.models[key] = model
        self.texts[key] = SourceText(self.display_root, text)
        self.absolute[key] = os.path.realpath(self.root_path)
        return key

    def child(self, parent: str, blk: SheetBlock, stack: tuple[str, ...]) -> str:
        where = self.texts[parent].locate(blk.file_span[0])
        if not blk.file.strip():
            raise SchematicError("sheet has an empty Sheetfile property", where)
        if "\x00" in blk.file:
            raise SchematicError("the Sheetfile name contains a NUL character", where)
        root_dir = self.root_path.parent
        candidates = [root_dir / blk.file, Path(self.absolute[parent]).parent / blk.file]
        path = next((c for c in candidates if _is_file(c)), candidates[0])
        resolved = os.path.realpath(path)
        folder = os.path.realpath(root_dir)
        if not self.policy.allow_outside and (
            Path(blk.file).is_absolute() or not _inside(resolved, folder)
        ):
            raise SchematicError(
                f"sheet file {excerpt(blk.file)} is outside the folder of the root schematic; "
                "pass --allow-outside to read it",
                where,
            )
        if resolved in stack:
            chain = " → ".join(Path(s).name for s in (*stack, resolved))
            raise SchematicError(f"sheet {excerpt(blk.file)} includes itself ({chain})", where)
        key = blk.file.replace("\\", "/")
        if key in self.models and self.absolute[key] == resolved:
            return key
        display = os.path.join(os.path.dirname(self.display_root), blk.file)
        try:
            model, text = self.read(path, display)
        except Unreadable as exc:
            raise SchematicError(
                f"cannot read sheet file {excerpt(blk.file)}: {exc.reason}", where
            ) from None
        self.models[key] = model
        self.texts[key] = SourceText(display, text)
        self.absolute[key] = resolved
        return key

    def visit(self, key: str, inst: Instance, stack: tuple[str, ...], where: Location) -> None:
        """Add ``inst`` and, depth first, the instances of the sheets it places."""
        if len(stack) > MAX_SHEET_DEPTH:
            raise SchematicError(f"sheets nested more than {MAX_SHEET_DEPTH} deep", where)
        if len(self.instances) >= MAX_INSTANCES:
            raise SchematicError(f"more than {MAX_INSTANCES:,} sheet instances", where)
        if key not in self.sizes:
            self.sizes[key] = _items(self.models[key])
        self.expanded += self.sizes[key]
        if self.expanded > MAX_EXPANDED_ITEMS:
            raise SchematicError(
                f"the sheet instances place more than {MAX_EXPANDED_ITEMS:,} items in all", where
            )
        self.instances.append(inst)
        for b_index, blk in enumerate(self.models[key].sheets):
            child = self.child(key, blk, stack)
            child_inst = Instance(
                len(self.instances),
                f"{inst.path}{blk.name or blk.uuid}/",
                child,
                blk.name,
                f"{inst.uuid_path}/{blk.uuid}",
                f"{inst.v6_path}/{blk.uuid}",
                inst.index,
                b_index,
            )
            here = self.texts[key].locate(blk.span[0])
            self.visit(child, child_inst, (*stack, self.absolute[child]), here)


def _is_file(path: Path) -> bool:
    try:
        return path.is_file()
    except (OSError, ValueError):  # a name too long, a NUL: the read reports it
        return False


def load_hierarchy(root: str | os.PathLike[str], policy: InputPolicy | None = None) -> Hierarchy:
    """Read ``root`` and, recursively, every sheet file it places.

    :param policy: size limits and whether sheets may lie outside the root's folder
        (default: :class:`~pullproof.limits.InputPolicy` defaults).
    :raises SchematicError: a file cannot be read, is too large, lies outside the root's
        folder, is not a schematic, or a sheet includes itself; positions name the
        offending token.
    """
    loader = _Loader(root, policy or InputPolicy())
    key = loader.root()
    model = loader.models[key]
    root_uuid = f"/{model.uuid}" if model.uuid else ""
    first = Instance(0, "/", key, "", root_uuid, "", -1, -1)
    loader.visit(key, first, (loader.absolute[key],), loader.texts[key].locate(0))
    return Hierarchy(key, loader.models, loader.texts, loader.absolute, tuple(loader.instances))
