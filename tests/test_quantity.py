"""The native quantity type against pint, the general-purpose units library it stands in for.

Every answer :class:`pullproof.quantity.Qty` gives natively (unit names and symbols,
conversion between spellings, °C ↔ K, base units, comparison, formatting) must be the
answer pint gives for the same value; pint is the reference here.
"""

from __future__ import annotations

import math

import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from pullproof.quantity import Qty, canonical_unit, pint_registry
from pullproof.units import Q_

ureg = pint_registry()
KEYS = ["V", "A", "ohm", "", "W", "s", "F", "1/K", "degC", "K"]
finite = st.floats(min_value=-1e12, max_value=1e12, allow_nan=False, allow_infinity=False)


@pytest.mark.parametrize("key", KEYS)
def test_unit_names_and_symbols_are_pints(key: str) -> None:
    q, ref = Qty(1.5, key), ureg.Quantity(1.5, key)
    assert str(q.units) == str(ref.units)
    assert f"{q.units:~P}" == f"{ref.units:~P}"
    assert q.dimensionless == ref.dimensionless
    assert str(q) == str(ref)
    assert f"{q:~P}" == f"{ref:~P}"


@pytest.mark.parametrize("key", KEYS)
@given(x=finite)
def test_magnitudes_and_conversions_are_pints(key: str, x: float) -> None:
    q, ref = Qty(x, key), ureg.Quantity(x, key)
    assert q.m_as(key) == ref.m_as(key)
    assert q.m_as(str(ref.units)) == ref.m_as(str(ref.units))
    assert q.to_base_units().magnitude == pytest.approx(ref.to_base_units().magnitude, rel=1e-15)
    if key in ("degC", "K"):
        other = "K" if key == "degC" else "degC"
        assert q.m_as(other) == ref.m_as(other)
        assert q.to(other).magnitude == ref.to(other).magnitude


@pytest.mark.parametrize(
    ("key", "prefixed"), [("V", "mV"), ("A", "uA"), ("ohm", "kohm"), ("F", "pF"), ("s", "ns")]
)
def test_prefixed_units_go_through_pint(key: str, prefixed: str) -> None:
    q = Qty(0.25, key)
    assert q.m_as(prefixed) == pytest.approx(ureg.Quantity(0.25, key).m_as(prefixed), rel=1e-15)
    assert isinstance(q.to(prefixed), pint.Quantity)


@given(a=finite, b=finite)
def test_comparisons_are_pints(a: float, b: float) -> None:
    qa, qb = Qty(a, "V"), Qty(b, "V")
    ra, rb = ureg.Quantity(a, "V"), ureg.Quantity(b, "V")
    assert (qa < qb, qa <= qb, qa > qb, qa >= qb) == (ra < rb, ra <= rb, ra > rb, ra >= rb)
    assert (qa < rb) == (ra < rb)  # against a pint quantity too
    assert abs(qa).magnitude == abs(ra).magnitude and (-qa).magnitude == (-ra).magnitude


def test_spellings_are_one_unit() -> None:
    # common practice: the names pint and the rules file use for the same unit
    assert canonical_unit("volt") == canonical_unit("V") == "V"
    assert canonical_unit("Ω") == canonical_unit("ohm") == "ohm"
    assert canonical_unit("degree_Celsius") == "degC"
    assert canonical_unit("mV") is None


def test_units_builder_returns_native_or_pint() -> None:
    assert isinstance(Q_(3.3, "V"), Qty)
    assert isinstance(Q_(3.3, "mV"), pint.Quantity)
    assert math.isclose(Q_(3.3, "mV").m_as("V"), 0.0033)
    with pytest.raises(ValueError):
        Qty(1.0, "mV")
