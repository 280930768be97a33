"""The window chart: one network's resistance limits drawn on a logarithmic axis.

:func:`window_chart` is a pure function from a :class:`NetworkResult` to an inline
``<svg>`` string. It reads in greyscale print: the regions a hard limit forbids
are hatched (lower limits one way, upper limits the other, so a crossed window
shows as cross-hatching), the window is a framed light band, the fitted
resistor's tolerance band a solid bar, E-series candidates short ticks and the
recommended value a triangle. :func:`chart_text` gives the same facts in words
for the ``<desc>`` element and for readers that do not see the picture.
"""

from __future__ import annotations

import hashlib
import math
from functools import lru_cache
from html import escape

from ..results import Bound, BoundKind, NetworkResult
from .format import format_ohms, format_percent, format_window

__all__ = ["chart_text", "window_chart"]

# Drawing geometry in SVG user units; the <svg> scales to its container's width.
_W, _H = 760, 222
_X0, _X1 = 20.0, 740.0
_TOP, _AXIS = 46.0, 156.0
_WIN = (56.0, 80.0)  # window band rows
_BAR = (94.0, 110.0)  # fitted band rows
_TICK = (130.0, 142.0)  # E-series candidate ticks
_INK = "#1d2730"
_HATCH = "#7a4b3a"
_WIN_FILL, _WIN_LINE = "#e4efe7", "#2e6a4c"
_BAR_FILL = "#24486e"


def _scale(values: list[float]) -> tuple[int, int]:
    """Decade range covering ``values`` with some room, at least three decades wide."""
    values = [v for v in values if 0 < v < math.inf]
    if not values:
        return 2, 6  # 100 Ω … 1 MΩ: where logic pulls live (common practice)
    lo = math.floor(math.log10(min(values) / 1.5))
    hi = math.ceil(math.log10(max(values) * 1.5))
    while hi - lo < 3:
        lo, hi = (lo - 1, hi) if (hi - lo) % 2 else (lo, hi + 1)
    return lo, hi


class _Axis:
    def __init__(self, d0: int, d1: int) -> None:
        self.d0, self.d1 = d0, d1

    def x(self, ohms: float) -> float:
        # A zero-ohm link or a band pushed below zero sits at the left edge, never a math error.
        if not ohms > 0:
            return _X0
        if math.isinf(ohms):
            return _X1
        t = (math.log10(ohms) - self.d0) / (self.d1 - self.d0)
        return _X0 + max(0.0, min(1.0, t)) * (_X1 - _X0)


def _hard(result: NetworkResult, kind: BoundKind) -> list[Bound]:
    return [b for b in result.bounds if b.hard and b.kind is kind]


def _binding_titles(result: NetworkResult, kind: BoundKind, ohms: float) -> str:
    """Titles of the hard bounds of ``kind`` that set the window side at ``ohms``."""
    hits = [
        b.title
        for b in _hard(result, kind)
        if b.ohms is not None and math.isclose(b.ohms, ohms, rel_tol=1e-9)
    ]
    return " and ".join(dict.fromkeys(hits)) or "limit"


def _side_word(result: NetworkResult, kind: BoundKind) -> str:
    """Why a window side is open: a bound could not be computed, or none applies."""
    # A network judged before any bound could be computed (e.g. its rail voltage is
    # unknown) has no bounds at all: its sides are unknown, not open.
    unknown = any(b.ohms is None for b in _hard(result, kind)) or (
        not result.bounds and bool(result.missing)
    )
    lower = kind is BoundKind.MIN
    if unknown:
        return "lower limit unknown" if lower else "upper limit unknown"
    return "no lower limit" if lower else "no upper limit"


def chart_text(result: NetworkResult) -> str:
    """The chart's content in sentences, for screen readers and the <desc> element."""
    lo, hi = result.window
    parts: list[str] = []
    if lo is not None and hi is not None and lo > hi:
        parts.append(
            f"The window is empty: the lower limit {format_ohms(lo)} "
            f"({_binding_titles(result, BoundKind.MIN, lo)}) is above the upper limit "
            f"{format_ohms(hi)} ({_binding_titles(result, BoundKind.MAX, hi)})."
        )
    else:
        low = (
            f"from {format_ohms(lo)} ({_binding_titles(result, BoundKind.MIN, lo)})"
            if lo is not None
            else f"from zero ({_side_word(result, BoundKind.MIN)})"
        )
        high = (
            f"to {format_ohms(hi)} ({_binding_titles(result, BoundKind.MAX, hi)})"
            if hi is not None
            else f"with {_side_word(result, BoundKind.MAX)}"
        )
        parts.append(f"Allowed resistance window {low} {high}.")
    res = result.network.resistor
    b_lo, b_hi = result.band
    parts.append(
        f"Fitted {', '.join(res.refs)} {format_ohms(res.ohms.magnitude('ohm'))} "
        f"±{format_percent(res.tolerance.magnitude(''))} spans {format_ohms(b_lo)} to "
        f"{format_ohms(b_hi)} over tolerance and temperature."
    )
    for b in result.bounds:
        if b.hard or b.ohms is None:
            continue
        side = "at least" if b.kind is BoundKind.MIN else "at most"
        parts.append(f"Soft limit {b.title}: {side} {format_ohms(b.ohms)}.")
    rec = result.recommendation
    if rec is not None:
        if rec.pick is not None:
            parts.append(
                f"{len(rec.candidates)} {rec.series} values fit; recommended "
                f"{format_ohms(rec.pick)}."
            )
        else:
            parts.append(f"No {rec.series} value fits the window.")
    return " ".join(parts)


def _text(x: float, y: float, label: str, anchor: str = "middle", cls: str = "") -> str:
    # Keep labels inside the drawing: a label near an edge is anchored to that edge.
    half = len(label) * 3.2
    if anchor == "middle":
        if x - half < _X0:
            x, anchor = _X0, "start"
        elif x + half > _X1:
            x, anchor = _X1, "end"
    elif anchor == "end" and x - 2 * half < _X0:
        x, anchor = _X0 + 2, "start"
    elif anchor == "start" and x + 2 * half > _X1:
        x, anchor = _X1 - 2, "end"
    klass = f' class="{cls}"' if cls else ""
    return f'<text x="{x:.1f}" y="{y:.1f}" text-anchor="{anchor}"{klass}>{escape(label)}</text>'


def _defs(pid: str) -> str:
    lines = []
    for name, angle in (("lo", 45), ("hi", -45)):
        lines.append(
            f'<pattern id="{pid}-{name}" width="7" height="7" patternUnits="userSpaceOnUse" '
            f'patternTransform="rotate({angle})">'
            f'<line x1="0" y1="0" x2="0" y2="7" stroke="{_HATCH}" stroke-width="1.6"/></pattern>'
        )
    return "<defs>" + "".join(lines) + "</defs>"


@lru_cache(maxsize=64)
def _axis(d0: int, d1: int) -> str:
    """The decade axis with its grid and labels: the same for every chart of one range."""
    ax = _Axis(d0, d1)
    out = [
        f'<line x1="{_X0}" y1="{_AXIS}" x2="{_X1}" y2="{_AXIS}" stroke="{_INK}" stroke-width="1"/>'
    ]
    for d in range(ax.d0, ax.d1 + 1):
        x = ax.x(10.0**d)
        out.append(
            f'<line x1="{x:.1f}" y1="{_AXIS}" x2="{x:.1f}" y2="{_AXIS + 7}" stroke="{_INK}"/>'
        )
        out.append(
            f'<line x1="{x:.1f}" y1="{_TOP}" x2="{x:.1f}" y2="{_AXIS}" stroke="#d5d9dd" '
            f'stroke-width="0.6"/>'
        )
        out.append(_text(x, _AXIS + 20, format_ohms(10.0**d), cls="ax"))
        if d < ax.d1:
            for m in range(2, 10):
                xm = ax.x(m * 10.0**d)
                out.append(
                    f'<line x1="{xm:.1f}" y1="{_AXIS}" x2="{xm:.1f}" y2="{_AXIS + 3.5}" '
                    f'stroke="{_INK}" stroke-width="0.6"/>'
                )
    return "".join(out)


def _regions(result: NetworkResult, ax: _Axis, pid: str) -> list[str]:
    """Hatched regions forbidden by the binding hard limits, each labelled with its title."""
    lo, hi = result.window
    out: list[str] = []
    h = _AXIS - _TOP
    # Light grounds first, hatching on top: where both regions overlap (an empty
    # window) the two hatch directions cross.
    for side, x0, x1 in (("lo", _X0, lo), ("hi", hi, _X1)):
        if x0 is None or x1 is None:
            continue
        a, b = (_X0, ax.x(x1)) if side == "lo" else (ax.x(x0), _X1)
        out.append(
            f'<rect x="{a:.1f}" y="{_TOP}" width="{b - a:.1f}" height="{h}" fill="#f7f0ea"/>'
        )
    for kind, value in ((BoundKind.MIN, lo), (BoundKind.MAX, hi)):
        low = kind is BoundKind.MIN
        if value is None:
            edge, anchor = (_X0 + 2, "start") if low else (_X1 - 2, "end")
            out.append(_text(edge, _TOP - 9, _side_word(result, kind), anchor, "open"))
            continue
        x = ax.x(value)
        a, b = (_X0, x) if low else (x, _X1)
        out.append(
            f'<rect class="forbid" x="{a:.1f}" y="{_TOP}" width="{b - a:.1f}" height="{h}" '
            f'fill="url(#{pid}-{"lo" if low else "hi"})" stroke="{_HATCH}" stroke-width="0.8"/>'
        )
        out.append(
            f'<line x1="{x:.1f}" y1="{_TOP - 4}" x2="{x:.1f}" y2="{_AXIS}" '
            f'stroke="{_HATCH}" stroke-width="2"/>'
        )
        label = f"{_binding_titles(result, kind, value)} {'≥' if low else '≤'} {format_ohms(value)}"
        # Two labels close together go on two rows so they never overprint.
        crowded = not low and lo is not None and x - ax.x(lo) <= 150
        y = _TOP - 25 if crowded else _TOP - 9
        out.append(_text(x - 5 if low else x + 5, y, label, "end" if low else "start", "lbl"))
    return out


def _other_limits(result: NetworkResult, ax: _Axis) -> list[str]:
    """Non-binding hard limits dashed, soft limits dotted; each has a hover title."""
    out: list[str] = []
    for b in result.bounds:
        sides = [w for w in result.window if w is not None]
        if b.ohms is None or (b.hard and any(math.isclose(b.ohms, w) for w in sides)):
            continue
        x = ax.x(b.ohms)
        dash = "4 3" if b.hard else "1.5 3"
        kind = "hard" if b.hard else "soft"
        sign = "≥" if b.kind is BoundKind.MIN else "≤"
        out.append(
            f'<line class="{kind}" x1="{x:.1f}" y1="{_TOP}" x2="{x:.1f}" y2="{_AXIS}" '
            f'stroke="{_INK}" stroke-width="1" stroke-dasharray="{dash}">'
            f"<title>{escape(f'{b.title} ({kind}): R {sign} {format_ohms(b.ohms)}')}</title></line>"
        )
    return out


def _window(result: NetworkResult, ax: _Axis) -> list[str]:
    lo, hi = result.window
    if lo is not None and hi is not None and lo > hi:
        xm = (ax.x(lo) + ax.x(hi)) / 2
        return [_text(xm, (_WIN[0] + _WIN[1]) / 2 + 4, "no window: the limits cross", cls="none")]
    x0 = ax.x(lo) if lo is not None else _X0
    x1 = ax.x(hi) if hi is not None else _X1
    label = f"window {format_window(result.window)}"
    out = [
        f'<rect class="window" x="{x0:.1f}" y="{_WIN[0]}" width="{max(x1 - x0, 1.5):.1f}" '
        f'height="{_WIN[1] - _WIN[0]}" fill="{_WIN_FILL}" stroke="{_WIN_LINE}" stroke-width="1.4"/>'
    ]
    y = (_WIN[0] + _WIN[1]) / 2 + 4
    out.append(_text((x0 + x1) / 2, y, label, cls="win"))
    return out


def _band(result: NetworkResult, ax: _Axis) -> list[str]:
    b_lo, b_hi = result.band
    res = result.network.resistor
    nominal = res.ohms.magnitude("ohm")
    x0, x1, xn = ax.x(b_lo), ax.x(b_hi), ax.x(nominal)
    w = max(x1 - x0, 3.0)
    label = (
        f"fitted {', '.join(res.refs)}: {format_ohms(nominal)} "
        f"±{format_percent(res.tolerance.magnitude(''))}"
    )
    right = x1 + 8 + len(label) * 6.2 < _X1
    return [
        f'<rect class="band" x="{x0:.1f}" y="{_BAR[0]}" width="{w:.1f}" '
        f'height="{_BAR[1] - _BAR[0]}" fill="{_BAR_FILL}"/>',
        f'<line x1="{xn:.1f}" y1="{_BAR[0] - 4}" x2="{xn:.1f}" y2="{_BAR[1] + 4}" '
        f'stroke="{_INK}" stroke-width="1.5"/>',
        _text(x1 + 8 if right else x0 - 8, _BAR[1] - 3, label, "start" if right else "end", "lbl"),
    ]


def _candidates(result: NetworkResult, ax: _Axis) -> list[str]:
    rec = result.recommendation
    if rec is None:
        return []
    out = [_tick(ax.d0, ax.d1, c) for c in rec.candidates]
    if rec.pick is not None:
        x = ax.x(rec.pick)
        y = _TICK[0] - 2
        out.append(
            f'<path class="pick" d="M{x - 6:.1f},{y - 9:.1f} L{x + 6:.1f},{y - 9:.1f} '
            f'L{x:.1f},{y:.1f} Z" fill="{_INK}"/>'
        )
        out.append(_text(x + 10, y - 1, f"{rec.series} pick {format_ohms(rec.pick)}", "start"))
    elif not rec.candidates:
        out.append(_text((_X0 + _X1) / 2, _TICK[1], f"no {rec.series} value fits", cls="open"))
    return out


@lru_cache(maxsize=4096)
def _tick(d0: int, d1: int, ohms: float) -> str:
    # E-series candidates recur from chart to chart on the same decades
    x = _Axis(d0, d1).x(ohms)
    return (
        f'<line class="cand" x1="{x:.1f}" y1="{_TICK[0]}" x2="{x:.1f}" '
        f'y2="{_TICK[1]}" stroke="{_INK}" stroke-width="1"/>'
    )


@lru_cache(maxsize=64)
def _legend(series: str) -> str:
    y = _H - 14
    items = [
        f'<rect x="{_X0}" y="{y - 9}" width="18" height="11" fill="url(#PID-lo)" '
        f'stroke="{_HATCH}" stroke-width="0.8"/>',
        _text(_X0 + 24, y, "forbidden by a hard limit", "start", "leg"),
        f'<rect x="{_X0 + 190}" y="{y - 9}" width="18" height="11" fill="{_WIN_FILL}" '
        f'stroke="{_WIN_LINE}"/>',
        _text(_X0 + 214, y, "window", "start", "leg"),
        f'<rect x="{_X0 + 280}" y="{y - 7}" width="18" height="8" fill="{_BAR_FILL}"/>',
        _text(_X0 + 304, y, "fitted band", "start", "leg"),
        f'<line x1="{_X0 + 390}" y1="{y - 9}" x2="{_X0 + 390}" y2="{y + 2}" stroke="{_INK}"/>',
        _text(_X0 + 398, y, f"{series} candidates", "start", "leg"),
        f'<line x1="{_X0 + 510}" y1="{y - 4}" x2="{_X0 + 530}" y2="{y - 4}" stroke="{_INK}" '
        f'stroke-dasharray="4 3"/>',
        _text(_X0 + 536, y, "other limit (dotted: soft)", "start", "leg"),
    ]
    return "".join(items)


def window_chart(result: NetworkResult, text: str | None = None) -> str:
    """Draw ``result``'s window, limits, fitted band and recommendation as an inline SVG.

    The element ids are derived from the net name, so several charts can share
    one HTML page; the returned text is safe to insert unescaped (every label
    from the schematic is escaped here). ``text`` is :func:`chart_text` of
    ``result`` when the caller has it already.
    """
    values = [v for v in result.window if v is not None and v > 0]
    values += [v for v in result.band if v > 0]
    values += [b.ohms for b in result.bounds if b.ohms is not None and b.ohms > 0]
    rec = result.recommendation
    if rec is not None:
        values += [c for c in rec.candidates if c > 0]
    ax = _Axis(*_scale(values))
    pid = "pp" + hashlib.sha256(result.network.net.encode("utf-8")).hexdigest()[:10]
    series = rec.series if rec is not None else result.network.rules.series
    body = [
        f'<title id="{pid}-t">Resistance window of {escape(result.network.net)}</title>',
        f'<desc id="{pid}-d">{escape(chart_text(result) if text is None else text)}</desc>',
        _defs(pid),
        f"<style>text{{font:11px system-ui,-apple-system,'Segoe UI',Roboto,sans-serif;"
        f"fill:{_INK}}}.lbl,.win,.none{{paint-order:stroke;stroke:#fff;stroke-width:3px;"
        f"stroke-linejoin:round}}.lbl{{font-weight:600}}.ax{{fill:#4a5560}}.open{{font-style:italic;"
        f"fill:#4a5560}}.none{{font-weight:700;font-size:12px}}.leg{{font-size:10px}}</style>",
        _axis(ax.d0, ax.d1),
        *_regions(result, ax, pid),
        *_other_limits(result, ax),
        *_window(result, ax),
        *_band(result, ax),
        *_candidates(result, ax),
        _legend(series).replace("PID", pid),
    ]
    return (
        f'<svg xmlns="http://www.w3.org/2000/svg" class="chart" role="img" '
        f'viewBox="0 0 {_W} {_H}" width="100%" preserveAspectRatio="xMidYMid meet" '
        f'aria-labelledby="{pid}-t {pid}-d">' + "".join(body) + "</svg>"
    )
