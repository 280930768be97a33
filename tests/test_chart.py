"""The inline SVG window chart: well-formed, logarithmic, labelled, readable without colour."""

from __future__ import annotations

import math
import re
import xml.etree.ElementTree as ET
from dataclasses import replace

import pytest

from pullproof.report.chart import chart_text, window_chart
from pullproof.results import NetworkResult
from pullproof.units import Q_
from resultfactory import (
    HOSTILE,
    hostile_result,
    net_fail,
    net_incomplete,
    net_mains,
    net_marginal,
    net_pass,
)

SVG = "{http://www.w3.org/2000/svg}"


def tree(result: NetworkResult) -> ET.Element:
    return ET.fromstring(window_chart(result))


def texts(root: ET.Element) -> list[str]:
    return ["".join(t.itertext()) for t in root.iter(f"{SVG}text")]


@pytest.mark.parametrize("make", [net_pass, net_fail, net_marginal, net_incomplete, net_mains])
def test_chart_is_well_formed_and_accessible(make: object) -> None:
    result = make()  # type: ignore[operator]
    root = tree(result)
    assert root.tag == f"{SVG}svg"
    assert root.get("role") == "img"
    title, desc = root.find(f"{SVG}title"), root.find(f"{SVG}desc")
    assert title is not None and desc is not None
    assert root.get("aria-labelledby") == f"{title.get('id')} {desc.get('id')}"
    assert desc.text == chart_text(result)
    assert root.get("width") == "100%" and root.get("viewBox")  # scales to the page width


def test_decade_ticks_are_labelled() -> None:
    labels = texts(tree(net_pass()))
    for label in ("100\u00a0Ω", "1\u00a0kΩ", "10\u00a0kΩ", "100\u00a0kΩ", "1\u00a0MΩ"):
        assert label in labels


def x_of(svg: str, label: str) -> float:
    m = re.search(rf'<text x="([\d.]+)" y="[\d.]+" text-anchor="middle" class="ax">{label}<', svg)
    assert m, label
    return float(m.group(1))


def test_axis_is_logarithmic() -> None:
    # Equal ratios take equal distances on a logarithmic axis (definition of a log scale).
    svg = window_chart(net_pass())
    a, b, c = (x_of(svg, s) for s in ("100\u00a0Ω", "1\u00a0kΩ", "10\u00a0kΩ"))
    assert math.isclose(b - a, c - b, rel_tol=1e-6)


def test_binding_regions_are_hatched_and_titled() -> None:
    result = net_pass()
    root = tree(result)
    regions = [r for r in root.iter(f"{SVG}rect") if r.get("class") == "forbid"]
    assert len(regions) == 2
    # Pattern fills, not flat colour, so the regions survive greyscale print.
    assert all(r.get("fill", "").startswith("url(#") for r in regions)
    labels = texts(root)
    assert "Resistor power while pulled ≥ 551\u00a0Ω" in labels
    assert "Contact wetting current ≤ 47.5\u00a0kΩ" in labels


def test_empty_window_cross_hatches_and_says_so() -> None:
    result = net_fail()
    root = tree(result)
    assert "no window: the limits cross" in texts(root)
    assert not [r for r in root.iter(f"{SVG}rect") if r.get("class") == "window"]
    fills = {r.get("fill") for r in root.iter(f"{SVG}rect") if r.get("class") == "forbid"}
    assert len(fills) == 2  # the two hatch directions overlap where the limits cross
    assert chart_text(result).startswith("The window is empty: the lower limit 882\u00a0Ω")


def test_missing_upper_limit_is_marked_unknown() -> None:
    result = net_incomplete()
    assert "upper limit unknown" in texts(tree(result))
    assert "from 240\u00a0Ω (Resistor power while pulled) with upper limit unknown" in chart_text(
        result
    )


def test_no_bounds_at_all() -> None:
    result = replace(net_pass(), bounds=(), window=(None, None), binding=(), recommendation=None)
    labels = texts(tree(result))
    assert "no lower limit" in labels and "no upper limit" in labels
    assert chart_text(result).startswith(
        "Allowed resistance window from zero (no lower limit) with no upper limit."
    )


def test_candidates_and_pick_are_drawn() -> None:
    result = net_pass()
    root = tree(result)
    rec = result.recommendation
    assert rec is not None and rec.pick is not None
    ticks = [e for e in root.iter(f"{SVG}line") if e.get("class") == "cand"]
    assert len(ticks) == len(rec.candidates)
    assert len([e for e in root.iter(f"{SVG}path") if e.get("class") == "pick"]) == 1
    assert "E24 pick 5.1\u00a0kΩ" in texts(root)


def test_fitted_band_bar_spans_the_band() -> None:
    result = net_pass()
    root = tree(result)
    bar = next(r for r in root.iter(f"{SVG}rect") if r.get("class") == "band")
    lo, hi = result.band
    # On the 10 Ω … 10 MΩ axis (6 decades over 720 units) the bar's width is log10(hi/lo)·120.
    assert math.isclose(float(bar.get("width", "0")), math.log10(hi / lo) * 120, abs_tol=0.11)


def test_soft_and_other_limits_are_dashed_with_titles() -> None:
    root = tree(net_pass())
    soft = [e for e in root.iter(f"{SVG}line") if e.get("class") == "soft"]
    assert len(soft) == 2
    titles = ["".join(e.itertext()) for e in soft]
    assert "Preferred range (high end) (soft): R ≤ 100\u00a0kΩ" in titles


def test_pattern_ids_differ_between_networks() -> None:
    ids = [
        {p.get("id") for p in tree(make()).iter(f"{SVG}pattern")} for make in (net_pass, net_fail)
    ]
    assert ids[0] and ids[1] and not ids[0] & ids[1]


def test_labels_are_escaped() -> None:
    svg = window_chart(hostile_result().networks[0])
    assert HOSTILE not in svg
    root = ET.fromstring(svg)  # still well-formed
    title = root.find(f"{SVG}title")
    assert title is not None and title.text == f"Resistance window of {HOSTILE}"


def test_chart_text_reads_the_whole_story() -> None:
    text = chart_text(net_pass()).replace("\u00a0", " ")
    assert text == (
        "Allowed resistance window from 551 Ω (Resistor power while pulled) to 47.5 kΩ "
        "(Contact wetting current). Fitted R12 10 kΩ ±5 % spans 9.44 kΩ to 10.6 kΩ over "
        "tolerance and temperature. Soft limit Preferred range (low end): at least 1 kΩ. "
        "Soft limit Preferred range (high end): at most 100 kΩ. 45 E24 values fit; "
        "recommended 5.1 kΩ."
    )


def test_zero_ohm_link_and_infinite_limit_do_not_break_the_axis() -> None:
    result = net_pass()
    res = replace(
        result.network.resistor, ohms=replace(result.network.resistor.ohms, value=Q_(0, "ohm"))
    )
    odd = replace(
        result,
        network=replace(result.network, resistor=res),
        band=(0.0, 0.0),
        window=(551.25, math.inf),
    )
    root = tree(odd)
    bar = next(r for r in root.iter(f"{SVG}rect") if r.get("class") == "band")
    assert bar.get("x") == "20.0"
