"""The one pint unit registry, and parsers for values as designers write them."""

from __future__ import annotations

import pint

__all__ = ["Q_", "ureg"]

ureg = pint.UnitRegistry()
Q_ = ureg.Quantity
