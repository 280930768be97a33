"""Loading a root schematic and every sheet it uses, as a list of sheet instances.

A sheet used twice is read once and instanced twice. Errors name the parent's
``Sheetfile`` property when a sub-sheet is missing, unreadable or includes itself.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from ..errors import SchematicError, SourceText
from .model import SchematicFile, SheetBlock
from .reader import read_path

__all__ = ["MAX_INSTANCES", "Hierarchy", "Instance", "load_hierarchy"]

MAX_INSTANCES = 10_000  # guards against a sheet tree that multiplies out of all proportion


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


def load_hierarchy(root: str | os.PathLike[str]) -> Hierarchy:
    """Read ``root`` and, recursively, every sheet file it places.

    :raises SchematicError: a file cannot be read, is not a schematic, or a sheet
        includes itself; positions name the offending token.
    """
    root_path = Path(root)
    display_root = os.fspath(root)
    try:
        model, text = read_path(root_path, display_root)
    except OSError as exc:
        raise SchematicError(f"cannot read {display_root}: {exc.strerror or exc}") from None
    root_dir = root_path.parent
    root_key = root_path.name
    models = {root_key: model}
    texts = {root_key: SourceText(display_root, text)}
    absolute = {root_key: str(root_path.resolve())}
    instances: list[Instance] = []

    def visit(
        key: str,
        path: str,
        name: str,
        uuid_path: str,
        v6: str,
        parent: int,
        block: int,
        stack: tuple[str, ...],
    ) -> None:
        if len(instances) >= MAX_INSTANCES:
            raise SchematicError(f"more than {MAX_INSTANCES} sheet instances")
        index = len(instances)
        instances.append(Instance(index, path, key, name, uuid_path, v6, parent, block))
        for b_index, blk in enumerate(models[key].sheets):
            child = _load_child(key, blk, stack)
            visit(
                child,
                f"{path}{blk.name or blk.uuid}/",
                blk.name,
                f"{uuid_path}/{blk.uuid}",
                f"{v6}/{blk.uuid}",
                index,
                b_index,
                (*stack, absolute[child]),
            )

    def _load_child(parent: str, blk: SheetBlock, stack: tuple[str, ...]) -> str:
        where = texts[parent].locate(blk.file_span[0])
        if not blk.file.strip():
            raise SchematicError("sheet has an empty Sheetfile property", where)
        candidates = [root_dir / blk.file, Path(absolute[parent]).parent / blk.file]
        path = next((c for c in candidates if c.is_file()), candidates[0])
        resolved = str(path.resolve())
        if resolved in stack:
            chain = " → ".join(Path(s).name for s in (*stack, resolved))
            raise SchematicError(f"sheet {blk.file!r} includes itself ({chain})", where)
        key = blk.file.replace("\\", "/")
        if key in models and absolute[key] == resolved:
            return key
        display = os.path.join(os.path.dirname(display_root), blk.file)
        try:
            model, text = read_path(path, display)
        except OSError as exc:
            reason = exc.strerror or str(exc)
            raise SchematicError(f"cannot read sheet file {blk.file!r}: {reason}", where) from None
        models[key] = model
        texts[key] = SourceText(display, text)
        absolute[key] = resolved
        return key

    root_uuid = f"/{model.uuid}" if model.uuid else ""
    visit(root_key, "/", "", root_uuid, "", -1, -1, (absolute[root_key],))
    return Hierarchy(root_key, models, texts, absolute, tuple(instances))
