"""Which root schematics a set of changed schematic files belongs to (for commit hooks).

A design's root is the schematic beside its project file (``NAME.kicad_pro`` →
``NAME.kicad_sch``). A changed file belongs to every root, in its own folder or a folder
above it (up to the enclosing git work tree), whose sheet hierarchy reads it. A changed
file that no such root reads is taken as a root itself (a design without a project file).
"""

from __future__ import annotations

import os
from collections.abc import Iterable
from pathlib import Path

from .errors import PullproofError
from .schematic.hierarchy import load_hierarchy

__all__ = ["roots_of"]


def _folders_up(start: Path) -> list[Path]:
    """``start`` and its parents, up to and including the enclosing git work tree."""
    out = []
    for folder in (start, *start.parents):
        out.append(folder)
        if (folder / ".git").exists():
            break
    else:
        return [start]  # not in a work tree: look only beside the file
    return out


def roots_of(changed: Iterable[str | os.PathLike[str]]) -> list[Path]:
    """The root schematics to review for ``changed`` files, in a stable order.

    Raises:
        SchematicError: a candidate root cannot be read (it names the file).
    """
    files_of: dict[Path, set[str]] = {}  # candidate root → absolute paths its hierarchy reads
    roots: list[Path] = []
    for item in changed:
        path = Path(item)
        if path.suffix != ".kicad_sch":
            continue
        real = Path(os.path.realpath(path))  # Path.resolve raises on a symbolic-link loop
        target = str(real)
        owners = []
        for folder in _folders_up(real.parent):
            for project in sorted(folder.glob("*.kicad_pro")):
                root = project.with_suffix(".kicad_sch")
                if not root.is_file():
                    continue
                if root not in files_of:
                    try:
                        files_of[root] = set(load_hierarchy(root).absolute.values())
                    except PullproofError:
                        files_of[root] = {os.path.realpath(root)}  # reported when reviewed
                if target in files_of[root]:
                    owners.append(root)
        for root in owners or [path]:
            if root not in roots:
                roots.append(root)
    return roots
