"""Logic-family data, user part libraries and part matching.

``load_families()`` gives the built-in families (TOML files in ``data/``);
``resolve_part()`` decides which data applies to a placed part.
"""

from __future__ import annotations

from .loader import Family, InputModel, load_families
from .match import (
    FIELDS,
    PartInfo,
    PartKind,
    PartLibrary,
    classify,
    family_from_name,
    load_part_library,
    resolve_part,
)

__all__ = [
    "FIELDS",
    "Family",
    "InputModel",
    "PartInfo",
    "PartKind",
    "PartLibrary",
    "classify",
    "family_from_name",
    "load_families",
    "load_part_library",
    "resolve_part",
]
