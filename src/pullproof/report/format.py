"""Human number formatting for reports: engineering prefixes, percentages, windows.

Reports never print a bare float: a value is shown with three significant
digits, an SI prefix and its unit symbol ("4.7 kΩ", "1 µA", "5 %", "100 ppm/K").
A non-breaking space joins number and unit so a printed table never splits them.
"""

from __future__ import annotations

from functools import lru_cache
from typing import Any

from ..provenance import Sourced
from ..quantity import Qty, pint_registry
from ..units import format_si

__all__ = [
    "NBSP",
    "engineering",
    "format_margin",
    "format_ohms",
    "format_percent",
    "format_quantity",
    "format_sourced",
    "format_value",
    "format_window",
]

NBSP = "\u00a0"

# Base units a quantity is converted to before it is given a prefix, with the symbol printed.
_BASES: tuple[tuple[str, str], ...] = (
    ("ohm", "Ω"),
    ("volt", "V"),
    ("ampere", "A"),
    ("watt", "W"),
    ("farad", "F"),
    ("second", "s"),
    ("hertz", "Hz"),
)


def _digits(value: float, sig: int = 3) -> str:
    """``value`` with ``sig`` significant digits, trailing zeros dropped (1.50 → 1.5)."""
    if value == 0:
        return "0"
    text = f"{value:.{sig}g}"
    if "e" in text:  # %g switches to exponent form above 10**sig; print the integer
        text = f"{value:.0f}"
    return text.replace("-", "−")  # a real minus sign


def engineering(value: float, unit: str, sig: int = 3) -> str:
    """Format ``value`` (in the base ``unit``) with an SI prefix: (4700, "Ω") → "4.7 kΩ"."""
    return format_si(value, unit, sig=sig, sep=NBSP)


# Boards repeat their values (10 kΩ, 3.3 V, the E-series): the two formatters the tables call
# most are pure functions of a float, so each distinct value is formatted once per process.
@lru_cache(maxsize=16384, typed=True)
def format_ohms(ohms: float | None) -> str:
    """A resistance in ohms as "4.7 kΩ"; None (no limit known) as "—"."""
    return "—" if ohms is None else engineering(ohms, "Ω")


def format_percent(fraction: float, sig: int = 3) -> str:
    """A fraction as a percentage: 0.05 → "5 %"."""
    return f"{_digits(fraction * 100.0, sig)}{NBSP}%"


def format_margin(margin: float | None, side: str = "below") -> str:
    """How far the band sits inside one window edge, in words a reader can use.

    ``margin`` is R_lo / min − 1 for the lower edge (``side`` "below") and max / R_hi − 1
    for the upper edge ("above"). Twice the limit or more reads as a multiple ("408× the
    minimum"), less as a percentage ("23 % above the minimum"); a violated edge says so.
    """
    if margin is None:
        return "—"
    ratio = 1.0 + margin  # R_lo / min, or max / R_hi
    if side == "below":
        if margin >= 1.0:
            return f"R_lo is {_digits(ratio)}×{NBSP}the minimum"
        if margin >= 0:
            return f"R_lo is {format_percent(margin)} above the minimum"
        return f"R_lo is {format_percent(-margin)} below the minimum: not met"
    if margin >= 1.0:
        return f"the maximum is {_digits(ratio)}×{NBSP}R_hi"
    if margin >= 0:
        return f"the maximum is {format_percent(margin)} above R_hi"
    over = 1.0 / ratio - 1.0 if ratio > 0 else float("inf")
    return f"R_hi is {format_percent(over)} above the maximum: not met"


def format_window(window: tuple[float | None, float | None]) -> str:
    """A (low, high) window: open ends print as 0 and ∞, a crossed window says so."""
    lo, hi = window
    left = "0" if lo is None else format_ohms(lo)
    right = "∞" if hi is None else format_ohms(hi)
    if lo is not None and hi is not None and lo > hi:
        return f"empty ({left} > {right})"
    return f"{left} … {right}"


def format_quantity(value: Any) -> str:
    """Format a pint quantity (or plain number) for a reader.

    Dimensionless ratios print as percentages, temperature coefficients in
    ppm/K, temperatures in °C, electrical quantities with an SI prefix. Any
    other unit falls back to pint's own compact text.
    """
    if not hasattr(value, "to"):
        return format_percent(float(value))
    if type(value) is Qty:
        return _format_qty(value)
    units = str(value.units)
    if units in ("degree_Celsius", "kelvin"):
        return f"{_digits(float(value.to('degC').magnitude))}{NBSP}°C"
    if units in ("delta_degree_Celsius",):
        return f"{_digits(float(value.to('kelvin').magnitude))}{NBSP}K"
    if value.dimensionless:
        return format_percent(float(value.to("").magnitude))
    if value.check("1/[temperature]"):
        return f"{_digits(float(value.to('1/K').magnitude) * 1e6)}{NBSP}ppm/K"
    if value.check("[electric_potential]"):
        volts = float(value.to("volt").magnitude)
        if 0.1 <= abs(volts) < 1000:  # designers write 0.8 V and 230 V, not 800 mV
            return f"{_digits(volts, 4)}{NBSP}V"
    ureg = pint_registry()
    for base, symbol in _BASES:
        if value.check(ureg(base).dimensionality):
            return engineering(float(value.to(base).magnitude), symbol)
    return f"{value:~P}"


_QTY_SYMBOL = {"ohm": "Ω", "V": "V", "A": "A", "W": "W", "F": "F", "s": "s"}


def _format_qty(value: Qty) -> str:
    """:func:`format_quantity` of a natively held quantity, without pint (same text)."""
    return _qty_text(value.unit, float(value.magnitude))


@lru_cache(maxsize=16384)
def _qty_text(unit: str, x: float) -> str:
    # a pure function of the unit and the float magnitude: rails and part data recur
    if unit in ("degC", "K"):
        return f"{_digits(Qty(x, unit).m_as('degC'))}{NBSP}°C"
    if unit == "":
        return format_percent(x)
    if unit == "1/K":
        return f"{_digits(x * 1e6)}{NBSP}ppm/K"
    if unit == "V" and 0.1 <= abs(x) < 1000:  # designers write 0.8 V and 230 V, not 800 mV
        return f"{_digits(x, 4)}{NBSP}V"
    return engineering(x, _QTY_SYMBOL[unit])


_SYMBOL = {"A": "A", "W": "W", "V": "V", "s": "s", "F": "F", "ohm": "Ω"}


@lru_cache(maxsize=16384, typed=True)
def format_value(x: float, unit: str) -> str:
    """A float in a base unit ("A", "W", "V", "s", "F", "ohm") as :func:`format_quantity`
    prints the same quantity, without building one (the operating-point tables hold many)."""
    if unit == "V" and 0.1 <= abs(x) < 1000:
        return f"{_digits(x, 4)}{NBSP}V"
    return engineering(x, _SYMBOL[unit])


def format_sourced(value: Sourced) -> str:
    """Format a :class:`Sourced` value's quantity (the provenance is shown separately)."""
    return format_quantity(value.value)
