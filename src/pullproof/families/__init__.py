"""Logic-family data, user part libraries and part matching.

``load_families()`` gives the built-in families (TOML files in ``data/``);
``resolve_part()`` decides which data applies to a placed part.
"""

from __future__ import annotations

from .loader import Family, InputModel, load_families

__all__ = ["Family", "InputModel", "load_families"]
