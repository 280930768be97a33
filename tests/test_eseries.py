"""E-series against IEC 60063 tables and the general-purpose `eseries` package."""

from __future__ import annotations

import math
import random

import eseries as ref
import pytest

from pullproof.eseries import (
    SERIES,
    TOLERANCE,
    above,
    below,
    format_ohms,
    format_rkm,
    nearest,
    values_between,
)

# IEC 60063 E24 as printed (REFERENCES §1, confirmed in the eseries library tables and
# the IEC 60063 value tables).
IEC_E24 = (
    "1.0 1.1 1.2 1.3 1.5 1.6 1.8 2.0 2.2 2.4 2.7 3.0 "
    "3.3 3.6 3.9 4.3 4.7 5.1 5.6 6.2 6.8 7.5 8.2 9.1"
)
# IEC 60063 E12 and E6 (same sources, confirmed).
IEC_E12 = "1.0 1.2 1.5 1.8 2.2 2.7 3.3 3.9 4.7 5.6 6.8 8.2"
IEC_E6 = "1.0 1.5 2.2 3.3 4.7 6.8"
IEC_E3 = "1.0 2.2 4.7"  # IEC 60063, confirmed in the eseries library (S1)

REF_KEYS = {
    "E3": ref.E3,
    "E6": ref.E6,
    "E12": ref.E12,
    "E24": ref.E24,
    "E48": ref.E48,
    "E96": ref.E96,
    "E192": ref.E192,
}


@pytest.mark.parametrize(
    ("name", "table"), [("E24", IEC_E24), ("E12", IEC_E12), ("E6", IEC_E6), ("E3", IEC_E3)]
)
def test_printed_tables(name: str, table: str) -> None:
    # IEC 60063 tables (confirmed)
    assert values_between(name, 1.0, 9.99) == [float(v) for v in table.split()]


@pytest.mark.parametrize(
    ("name", "mantissa"),
    # IEC 60063 irregular members: E24 2.7 3.0 3.3 3.6 3.9 4.3 4.7 8.2; E192 9.20
    # (REFERENCES §1.3, confirmed in secondary sources and derived)
    [("E24", m) for m in (27, 30, 33, 36, 39, 43, 47, 82)] + [("E192", 920)],
)
def test_irregular_members(name: str, mantissa: int) -> None:
    assert mantissa in SERIES[name]


def test_e192_has_no_919() -> None:
    assert 919 not in SERIES["E192"]  # IEC 60063 prints 9.20 (confirmed, secondary)


@pytest.mark.parametrize(
    ("name", "tol"),
    # customary tolerance per series, IEC 60063 convention (confirmed in S1, S2, S6)
    [
        ("E3", 0.4),
        ("E6", 0.2),
        ("E12", 0.1),
        ("E24", 0.05),
        ("E48", 0.02),
        ("E96", 0.01),
        ("E192", 0.005),
    ],
)
def test_tolerances(name: str, tol: float) -> None:
    assert TOLERANCE[name] == tol
    assert ref.tolerance(REF_KEYS[name]) == pytest.approx(tol)  # eseries package


@pytest.mark.parametrize("name", list(REF_KEYS))
def test_decade_matches_reference_library(name: str) -> None:
    # the eseries package (general-purpose reference library)
    assert values_between(name, 1.0, 9.999) == list(ref.erange(REF_KEYS[name], 1.0, 9.999))
    assert len(SERIES[name]) == int(name[1:])


def _random_values(seed: int, count: int) -> list[float]:
    rng = random.Random(seed)
    return [10 ** rng.uniform(-1.0, 9.0) for _ in range(count)]


@pytest.mark.parametrize("name", list(REF_KEYS))
def test_queries_agree_with_reference_library(name: str) -> None:
    # the eseries package: nearest, bracketing and range queries on 3000 random values
    key = REF_KEYS[name]
    for x in _random_values(60063 + len(name), 1000):
        assert math.isclose(nearest(name, x), ref.find_nearest(key, x), rel_tol=1e-9)
        assert math.isclose(below(name, x), ref.find_less_than_or_equal(key, x), rel_tol=1e-9)
        assert math.isclose(above(name, x), ref.find_greater_than_or_equal(key, x), rel_tol=1e-9)
    rng = random.Random(62)
    for _ in range(200):
        lo = 10 ** rng.uniform(0.0, 6.0)
        hi = lo * 10 ** rng.uniform(0.0, 1.5)
        ours = values_between(name, lo, hi)
        theirs = list(ref.erange(key, lo, hi))
        assert len(ours) == len(theirs), (lo, hi)
        assert all(math.isclose(a, b, rel_tol=1e-9) for a, b in zip(ours, theirs, strict=True))


@pytest.mark.parametrize(
    ("query", "expected"),
    [
        # the eseries package page examples (REFERENCES §9 quick vectors, confirmed)
        (lambda: nearest("E24", 319), 330.0),
        (lambda: above("E96", 184), 187.0),
        # REFERENCES §9 Example 1 (derived from JESD7A values + IEC 60063)
        (lambda: below("E24", 1.35e6), 1.3e6),
        (lambda: below("E12", 1.35e6), 1.2e6),
        (lambda: below("E6", 1.35e6), 1.0e6),
        (lambda: below("E96", 1.35e6), 1.33e6),
        (lambda: below("E192", (4.5 - 3.15) / 1e-6), 1.35e6),  # on the boundary, float noise
        (lambda: below("E24", 0.5 / 0.1e-6), 4.7e6),
        (lambda: below("E96", 0.5 / 0.1e-6), 4.99e6),
        (lambda: below("E24", 1.8 / 1e-6), 1.8e6),
        (lambda: below("E48", 1.8 / 1e-6), 1.78e6),
        # REFERENCES §9 Example 3 (74LS pull-down, derived)
        (lambda: below("E24", 0.8 / 0.4e-3), 2000.0),
        (lambda: below("E48", 0.8 / 0.4e-3), 1960.0),
        (lambda: below("E96", 0.8 / 1.6e-3), 499.0),
    ],
)
def test_worked_examples(query: object, expected: float) -> None:
    assert callable(query)
    assert math.isclose(query(), expected, rel_tol=1e-9)


def test_range_worked_example() -> None:
    # REFERENCES §9 Example 2: UM10204 Fast-mode window 966.7 … 1770.3 Ω (derived)
    assert values_between("E24", 966.7, 1770.3) == [1000.0, 1100.0, 1200.0, 1300.0, 1500.0, 1600.0]
    assert len(values_between("E96", 966.7, 1770.3)) == 25
    assert values_between("E6", 966.7, 5901.1) == [1000.0, 1500.0, 2200.0, 3300.0, 4700.0]


@pytest.mark.parametrize(
    ("ohms", "code"),
    # IEC 60062 letter-and-digit code (REFERENCES §2 and §9: confirmed or derived)
    [
        (4700, "4K7"),
        (470, "470R"),
        (0.47, "R47"),
        (2000, "2K0"),
        (1.35e6, "1M35"),
        (4.7, "4R7"),
        (47, "47R"),
        (47300, "47K3"),
        (1e9, "1G0"),
        (1000, "1K0"),
        (0.0068, "6L8"),
        (0.1, "R10"),
        (2.2e6, "2M2"),
        (0, "0R"),
    ],
)
def test_format_rkm(ohms: float, code: str) -> None:
    assert format_rkm(ohms) == code


@pytest.mark.parametrize(
    ("ohms", "text"),
    [(4700, "4.7 kΩ"), (470, "470 Ω"), (1.35e6, "1.35 MΩ"), (2000, "2 kΩ"), (0.47, "470 mΩ")],
)
def test_format_ohms(ohms: float, text: str) -> None:
    assert format_ohms(ohms) == text  # SI prefixes, common practice


@pytest.mark.parametrize("bad", [0.0, -1.0, math.inf, math.nan])
def test_bad_queries(bad: float) -> None:
    with pytest.raises(ValueError, match="finite positive resistance"):
        below("E24", bad)


def test_unknown_series() -> None:
    with pytest.raises(ValueError, match="unknown E-series 'E7'"):
        values_between("E7", 1, 10)
