"""pullproof: worst-case checks for pull-up and pull-down resistors on digital inputs.

The public API is small: read a root schematic into a :class:`Circuit`, review
it, and render reports from the returned objects.
"""

from __future__ import annotations

from .circuit import Circuit, Net, NetMember, Part, PartPin
from .errors import PullproofError

__version__ = "0.1.0"

__all__ = [
    "Circuit",
    "Net",
    "NetMember",
    "Part",
    "PartPin",
    "PullproofError",
    "__version__",
]
