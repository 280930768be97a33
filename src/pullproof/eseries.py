"""IEC 60063 preferred-number series (E3 … E192) and resistance formatting.

Series are held as integer mantissas of one decade (two digits up to E24, three
from E48) so that no binary-fraction error creeps into the tables; a value is
built exactly with :class:`decimal.Decimal` and only then turned into a float.
Values passed in and returned are resistances in ohms (floats); comparisons
at the boundaries use a relative tolerance of 1e-9, because worst-case limits
computed in floating point land a hair off a series value (e.g. 1.35 MΩ).
"""

from __future__ import annotations

import math
from bisect import bisect_left, bisect_right
from decimal import Decimal
from functools import lru_cache
from types import MappingProxyType
from typing import Any

from .units import format_si

__all__ = [
    "REL_TOL",
    "SERIES",
    "TOLERANCE",
    "above",
    "below",
    "format_ohms",
    "format_rkm",
    "nearest",
    "series_names",
    "values_between",
]

REL_TOL = 1e-9

# IEC 60063 E3 … E24 as printed (two significant figures). The irregular members
# 2.7 3.0 3.3 3.6 3.9 4.3 4.7 8.2 are the standard's, not the rounding formula's.
# fmt: off
_E24 = (10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30,
        33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91)
# fmt: on
_E12 = (10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82)
_E6 = (10, 15, 22, 33, 47, 68)
_E3 = (10, 22, 47)


def _three_figure(n: int) -> tuple[int, ...]:
    """E48/E96/E192: round(10**(i/n)) to three figures; the one exception is E192's 9.20."""
    values = [round(100 * 10 ** (i / n)) for i in range(n)]
    if n == 192:
        values[185] = 920  # IEC 60063 prints 9.20 where the formula gives 9.19
    return tuple(values)


SERIES: MappingProxyType[str, tuple[int, ...]] = MappingProxyType(
    {
        "E3": _E3,
        "E6": _E6,
        "E12": _E12,
        "E24": _E24,
        "E48": _three_figure(48),
        "E96": _three_figure(96),
        "E192": _three_figure(192),
    }
)

# The tolerance customarily sold with each series (fraction), per IEC 60063 convention.
TOLERANCE: MappingProxyType[str, float] = MappingProxyType(
    {"E3": 0.40, "E6": 0.20, "E12": 0.10, "E24": 0.05, "E48": 0.02, "E96": 0.01, "E192": 0.005}
)


def series_names() -> tuple[str, ...]:
    """The series names, coarsest first."""
    return tuple(SERIES)


def _mantissas(name: str) -> tuple[int, ...]:
    try:
        return SERIES[name.upper()]
    except KeyError:
        raise ValueError(
            f"unknown E-series {name!r}; expected one of {', '.join(SERIES)}"
        ) from None


def _ohms(value: Any) -> float:
    """Accept a float in ohms or a pint quantity of resistance."""
    if hasattr(value, "to"):
        return float(value.to("ohm").magnitude)
    return float(value)


# Every query walks a few decades; building their members from Decimals each time was most
# of a recommendation's cost. A decade's members are fixed, ascending, and few.
@lru_cache(maxsize=512)
def _decade_values(name: str, exponent: int) -> tuple[float, ...]:
    """The series members in the decade [10**exponent, 10**(exponent+1)), ascending."""
    mantissas = _mantissas(name)
    shift = exponent - (len(str(mantissas[0])) - 1)
    return tuple(float(Decimal(m).scaleb(shift)) for m in mantissas)


def _check_positive(x: float) -> None:
    if not math.isfinite(x) or x <= 0:
        raise ValueError(f"an E-series query needs a finite positive resistance, got {x!r}")


def values_between(name: str, lo: Any, hi: Any) -> list[float]:
    """Every member of series ``name`` in [lo, hi] (inclusive within REL_TOL), ascending."""
    low, high = _ohms(lo), _ohms(hi)
    _check_positive(low)
    _check_positive(high)
    if low > high * (1 + REL_TOL):
        return []
    first, last = low * (1 - REL_TOL), high * (1 + REL_TOL)
    out: list[float] = []
    for exponent in range(math.floor(math.log10(low)) - 1, math.floor(math.log10(high)) + 2):
        members = _decade_values(name, exponent)
        out.extend(members[bisect_left(members, first) : bisect_right(members, last)])
    return out


def below(name: str, value: Any) -> float:
    """The largest member ≤ ``value`` (a member within REL_TOL counts as equal)."""
    x = _ohms(value)
    _check_positive(x)
    return values_between(name, x / 20, x)[-1]


def above(name: str, value: Any) -> float:
    """The smallest member ≥ ``value`` (a member within REL_TOL counts as equal)."""
    x = _ohms(value)
    _check_positive(x)
    return values_between(name, x, x * 20)[0]


def nearest(name: str, value: Any) -> float:
    """The member closest to ``value`` in ohms (absolute difference; a tie goes to the lower)."""
    x = _ohms(value)
    lo, hi = below(name, x), above(name, x)
    return lo if x - lo <= hi - x else hi


# R covers 0.1 Ω (R10) up to 999 Ω; below 0.1 Ω the milliohm letter L reads better (6L8).
_RKM_LETTERS = ((1e12, "T"), (1e9, "G"), (1e6, "M"), (1e3, "K"), (0.1, "R"), (0.0, "L"))
_RKM_SCALE = MappingProxyType({"T": 1e12, "G": 1e9, "M": 1e6, "K": 1e3, "R": 1.0, "L": 1e-3})


def format_rkm(value: Any, figures: int | None = None) -> str:
    """Write a resistance in the IEC 60062 letter-and-digit code: 4700 → "4K7", 0.47 → "R47".

    ``figures`` is the number of significant figures shown (default: as many as the
    value needs, at least two, at most three), so E24 2000 Ω is "2K0" and 1.35 MΩ "1M35".
    """
    x = _ohms(value)
    if not math.isfinite(x) or x < 0:
        raise ValueError(f"cannot write {x!r} Ω as a resistance code")
    if x == 0:
        return "0R"
    letter = next(c for s, c in _RKM_LETTERS if x >= s * (1 - REL_TOL))
    scale = _RKM_SCALE[letter]
    digits = figures or _needed_figures(x)
    mantissa = Decimal(repr(x)) / Decimal(repr(scale))
    # decimal places that leave `digits` significant figures in the scaled mantissa
    places = max(digits - 1 - math.floor(math.log10(float(mantissa))), 0)
    text = f"{mantissa:.{places}f}"
    whole, _, frac = text.partition(".")
    if letter == "R" and whole == "0":
        return f"R{frac}"
    if letter == "L" and whole == "0":
        return f"L{frac}"
    return f"{whole}{letter}{frac}"


def _needed_figures(x: float) -> int:
    for figures in (2, 3):
        if math.isclose(float(f"{x:.{figures}g}"), x, rel_tol=REL_TOL):
            return figures
    return 3


def format_ohms(value: Any, figures: int = 3) -> str:
    """A readable resistance such as "4.7 kΩ", "470 Ω", "1.35 MΩ" (trailing zeros dropped)."""
    return format_si(_ohms(value), "Ω", sig=figures, minus="-")
