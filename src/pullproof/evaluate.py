"""Judge one pull network: window, fitted band, margin, verdict and E-series recommendation.

Window = [largest minimum, smallest maximum] over the hard bounds and those resting on
an assumed value (:func:`pullproof.assumed.counted`). The fitted resistor's whole band
(tolerance and TCR over the rules' temperature span) must sit inside it.
Verdicts: ``fail`` when a hard bound or check is violated (an empty window of hard
bounds always fails); else ``incomplete`` when a needed value is missing; else
``marginal`` when a limit resting on an assumption is violated (it would fail if the
assumption holds, and an assumption never makes a hard fail), a soft bound is missed or
the band sits closer than the rules' margin ratio (default 10 %) to a binding edge; else
``pass``. The result's ``basis`` is ``assumed`` when any number it rests on is.
"""

from __future__ import annotations

import math
from bisect import bisect_left
from collections.abc import Iterable, Mapping
from dataclasses import replace

from . import eseries
from .assumed import assumed_band, assumptions_of, counted, nominal_meets, soften
from .constraints import BUILTIN, Constraint, ConstraintPluginError
from .constraints._common import band, dedupe, eng, pct
from .errors import RulesError
from .network import Missing, PullNetwork
from .operating import analyse, operating_points
from .results import Basis, Bound, BoundKind, Check, NetworkResult, Recommendation, Verdict

__all__ = ["DEFAULT_MARGIN_RATIO", "OPEN_BOTTOM_OHMS", "OPEN_TOP_OHMS", "evaluate", "recommend"]

#: A band closer than this (ratio) to a binding hard edge is marginal, unless the rules say.
DEFAULT_MARGIN_RATIO = 0.10
#: With no hard maximum, candidates stop at max(1 MΩ, 10 × minimum): above about 1 MΩ
#: board leakage (flux, humidity) competes with the pull (common practice).
OPEN_TOP_OHMS = 1e6
#: With no hard minimum, candidates start at min(1 kΩ, maximum / 10): below that a pull
#: wastes current for no benefit on a logic input (common practice).
OPEN_BOTTOM_OHMS = 1e3
# Float slack at bound edges: a value computed to sit on an edge is on it.
_REL = 1e-9


def evaluate(
    network: PullNetwork, *, registry: Mapping[str, Constraint] | None = None
) -> NetworkResult:
    """Run every constraint of ``registry`` (default: the built-ins) and judge the result.

    Raises :class:`~pullproof.constraints.ConstraintPluginError` when a constraint that
    is not built in fails while running.
    """
    reg = BUILTIN if registry is None else registry
    items = _run(reg, network)
    bounds = tuple(i for i in items if isinstance(i, Bound))
    checks = tuple(i for i in items if isinstance(i, Check))
    r_lo, r_hi = band(network.resistor, network.rules)

    mins = [b for b in bounds if counted(b) and b.kind is BoundKind.MIN and b.ohms is not None]
    maxs = [b for b in bounds if counted(b) and b.kind is BoundKind.MAX and b.ohms is not None]
    lo_b = max(mins, key=_ohms, default=None)
    hi_b = min(maxs, key=_ohms, default=None)
    lo = None if lo_b is None else _ohms(lo_b)
    hi = None if hi_b is None else _ohms(hi_b)
    margins = (
        None if lo is None or lo == 0 else r_lo / lo - 1,
        None if hi is None or r_hi == 0 else hi / r_hi - 1,
    )
    binding = tuple(b.constraint for b in (lo_b, hi_b) if b is not None)
    missing = dedupe(
        [*network.missing]
        + [m for b in bounds if not b.evaluated for m in b.missing]
        + [m for c in checks if c.ok is None for m in c.missing]
    )
    empty = lo is not None and hi is not None and lo > hi * (1 + _REL)
    advice = _advice(lo_b, hi_b) if empty else ()
    verdict, reason = _judge(network, bounds, checks, (r_lo, r_hi), lo_b, hi_b, margins, missing)
    rec = None
    if not missing and not empty and (lo is not None or hi is not None):
        soft = [b for b in bounds if not counted(b) and b.evaluated]
        rec = recommend(network, (lo, hi), soft=soft, points=False)
    operating, points = analyse(network, rec.candidates if rec else ())
    if rec is not None:
        rec = replace(rec, points=points)
    # A fail rests on a hard limit or check (no assumed value is in one) and the fitted value:
    # on data; an incomplete verdict concludes nothing. A pass or marginal rests on every
    # limit and check it was judged by.
    assumptions = (
        ()
        if verdict in (Verdict.FAIL, Verdict.INCOMPLETE)
        else assumptions_of((*bounds, *checks), network.resistor, network.assumed)
    )
    return NetworkResult(
        network=network,
        bounds=bounds,
        window=(lo, hi),
        band=(r_lo, r_hi),
        verdict=verdict,
        reason=reason,
        margins=margins,
        binding=binding,
        recommendation=rec,
        checks=checks,
        advice=advice,
        missing=missing,
        operating=operating,
        basis=Basis.ASSUMED if assumptions else Basis.DATA,
        assumptions=assumptions,
    )


def _run(reg: Mapping[str, Constraint], network: PullNetwork) -> list[Bound | Check]:
    builtins = set(map(id, BUILTIN.values()))
    out: list[Bound | Check] = []
    for cid, c in reg.items():
        if id(c) in builtins:
            out.extend(soften(item) for item in c(network))
            continue
        try:
            found = tuple(c(network))
        except Exception as exc:  # a plugin's bug is reported in one line, never a traceback
            raise ConstraintPluginError(
                f"constraint {cid!r} failed on net {network.net}: {exc}"
            ) from None
        for item in found:
            if not isinstance(item, Bound | Check):
                raise ConstraintPluginError(
                    f"constraint {cid!r} returned {type(item).__name__}; expected Bound or Check"
                )
        out.extend(soften(item) for item in found)
    return out


def _ohms(b: Bound) -> float:
    assert b.ohms is not None
    return b.ohms


def _violated(b: Bound, r_lo: float, r_hi: float) -> bool:
    if b.ohms is None:
        return False
    if b.kind is BoundKind.MIN:
        return r_lo < b.ohms * (1 - _REL)
    return r_hi > b.ohms * (1 + _REL)


def _advice(lo_b: Bound | None, hi_b: Bound | None) -> tuple[str, ...]:
    out = []
    for b, word in ((lo_b, "at least"), (hi_b, "at most")):
        if b is None or b.ohms is None:
            continue
        tip = f"; relax it with {b.relax}" if b.relax else ""
        out.append(f"{b.title} ({b.constraint}) needs R {word} {eng(b.ohms, 'Ω')}{tip}.")
    return tuple(out)


def _judge(
    network: PullNetwork,
    bounds: tuple[Bound, ...],
    checks: tuple[Check, ...],
    rband: tuple[float, float],
    lo_b: Bound | None,
    hi_b: Bound | None,
    margins: tuple[float | None, float | None],
    missing: tuple[Missing, ...],
) -> tuple[Verdict, str]:
    """The verdict and its deciding reason, as a plain sentence naming the parts."""
    r_lo, r_hi = rband
    res = network.resistor
    who = (
        f"{'/'.join(res.refs)} ({eng(res.ohms.magnitude('ohm'), 'Ω')} "
        f"±{pct(res.tolerance.magnitude(''))})"
    )
    fitted = f"{who} spans {eng(r_lo, 'Ω')}–{eng(r_hi, 'Ω')}"
    if lo_b is not None and hi_b is not None and _ohms(lo_b) > _ohms(hi_b) * (1 + _REL):
        text = (
            f"No resistance fits: R must be at least {_limit(lo_b, aside=True)} but at most "
            f"{_limit(hi_b, aside=True)}."
        )
        if lo_b.hard and hi_b.hard:
            return Verdict.FAIL, text
        if not [b for b in bounds if b.hard and _violated(b, r_lo, r_hi)] and not missing:
            return Verdict.MARGINAL, f"{text[:-1]}{_resting(lo_b, hi_b)}"
    hard_bad = [b for b in bounds if b.hard and _violated(b, r_lo, r_hi)]
    band_rests_on = assumed_band(res)
    nominal = res.ohms.magnitude("ohm")
    band_only = [b for b in hard_bad if band_rests_on and nominal_meets(b, nominal)]
    hard_bad = [b for b in hard_bad if b not in band_only]
    if hard_bad:
        b = max(hard_bad, key=lambda x: _shortfall(x, r_lo, r_hi))
        return Verdict.FAIL, f"{_reach(who, b, r_lo, r_hi)}, {_side(b)} the {_limit(b)}."
    bad_checks = [c for c in checks if c.hard and c.ok is False]
    if bad_checks:
        return Verdict.FAIL, _check_reason(bad_checks[0])
    if missing:
        m = missing[0]
        more = f" (and {len(missing) - 1} more)" if len(missing) > 1 else ""
        return Verdict.INCOMPLETE, f"Cannot judge yet: {m.what} is unknown{more}; {m.hint}."
    if band_only:
        # The nominal value meets the limit; only the assumed tolerance or TCR carries the
        # band across it, and an assumption never makes a hard fail.
        b = band_only[0]
        return Verdict.MARGINAL, (
            f"{_reach(who, b, r_lo, r_hi)}, {_side(b)} the {_limit(b)}, but only through the "
            f"assumed {' and '.join(band_rests_on)}; state the part's Tolerance and TCR to decide."
        )
    assumed_bad = [b for b in bounds if not b.hard and b.assumed and _violated(b, r_lo, r_hi)]
    if assumed_bad:
        b = max(assumed_bad, key=lambda x: _shortfall(x, r_lo, r_hi))
        reach = _reach(who, b, r_lo, r_hi)
        return Verdict.MARGINAL, f"{reach}, {_side(b)} the {_limit(b)}{_resting(b)}"
    assumed_checks = [c for c in checks if not c.hard and c.assumed and c.ok is False]
    if assumed_checks:
        c = assumed_checks[0]
        return Verdict.MARGINAL, f"{_check_reason(c)[:-1]}{_resting(c)}"
    soft_bad = [b for b in bounds if not b.hard and _violated(b, r_lo, r_hi)]
    soft_bad_checks = [c for c in checks if not c.hard and c.ok is False]
    if soft_bad:
        b = soft_bad[0]
        reach = _reach(who, b, r_lo, r_hi)
        rests = f"; that limit rests on {', '.join(b.assumed)}" if b.assumed else ""
        return Verdict.MARGINAL, (
            f"Hard limits are met, but {reach}, {_side(b)} the {_limit(b)}{rests}."
        )
    if soft_bad_checks:
        c = soft_bad_checks[0]
        text = c.sentence or f"{c.title.lower()} is missed"
        return Verdict.MARGINAL, f"Hard limits are met, but {text}."
    need = network.rules.margin_ratio
    threshold = DEFAULT_MARGIN_RATIO if need is None else need.magnitude("")
    edges = [(r, e) for r, e in zip(margins, (lo_b, hi_b), strict=True) if r is not None and e]
    if edges:
        ratio, edge = min(edges, key=lambda e: e[0])
        ask = f"the rules ask for {pct(threshold)}"
        if ratio < threshold:
            reach = _reach(who, edge, r_lo, r_hi)
            met = "Hard limits are met" if edge.hard else "Every limit is met as assumed"
            return Verdict.MARGINAL, (
                f"{met}, but {reach}, only {pct(ratio)} inside the {_limit(edge)}; {ask}."
            )
        if ratio >= 1.0:
            # A percentage in the thousands reads as noise: say how many times over it is.
            times = f"{1 + ratio:.3g}×"
            lim = eng(_ohms(edge), "Ω")
            room = (
                f"R_lo is {times} the {lim} minimum"
                if edge.kind is BoundKind.MIN
                else f"the {lim} maximum is {times} R_hi"
            )
            return Verdict.PASS, f"{fitted}, well inside the window: {room}."
        return Verdict.PASS, f"{fitted}, at least {pct(ratio)} inside the window."
    return Verdict.PASS, f"{fitted}; no constraint limits the resistance on this net."


def _resting(*items: Bound | Check) -> str:
    """The tail of a reason whose limit rests on assumed values: it is marginal, not a fail,
    until the values are stated."""
    names = ", ".join(dict.fromkeys(a for item in items for a in item.assumed))
    if not names:
        return "."
    return (
        f"; that would fail, but the limit rests on {names}, which nothing states: confirm "
        "it (an assumption never makes a fail)."
    )


def _reach(who: str, b: Bound, r_lo: float, r_hi: float) -> str:
    """'R3 (47 kΩ ±5 %) can reach 49.9 kΩ' for the band end a bound compares."""
    if b.kind is BoundKind.MIN:
        return f"{who} can be as low as {eng(r_lo, 'Ω')}"
    return f"{who} can reach {eng(r_hi, 'Ω')}"


def _side(b: Bound) -> str:
    return "below" if b.kind is BoundKind.MIN else "above"


def _limit(b: Bound, *, aside: bool = False) -> str:
    """'3.2 kΩ at which SW3 still gets its 1 mA wetting current' (a bound's own clause), or
    '3.2 kΩ maximum set by contact wetting current' for a bound that gives none."""
    value = eng(_ohms(b), "Ω")
    if b.says:
        return f"{value} ({b.says})" if aside else f"{value} {b.says}"
    word = "minimum" if b.kind is BoundKind.MIN else "maximum"
    return f"{value} ({b.title.lower()})" if aside else f"{value} {word} set by {b.title.lower()}"


def _check_reason(c: Check) -> str:
    if c.sentence:
        return f"{c.sentence[:1].upper()}{c.sentence[1:]}."
    return f"{c.title} is not met: it needs {c.substituted} ({c.constraint})."


def _shortfall(b: Bound, r_lo: float, r_hi: float) -> float:
    """How far (as a ratio) the band overshoots a bound: the worst violation is reported."""
    return _ohms(b) / r_lo if b.kind is BoundKind.MIN else r_hi / max(_ohms(b), 1e-300)


def recommend(
    network: PullNetwork,
    window: tuple[float | None, float | None],
    *,
    soft: Iterable[Bound] = (),
    points: bool = True,
) -> Recommendation:
    """E-series values whose whole band fits ``window``, and the pick by the rules' policy.

    The band uses the fitted resistor's tolerance and TCR (the part the designer
    buys), so the list answers "which value of this part would fit". An open side
    of the window is closed at :data:`OPEN_TOP_OHMS` / :data:`OPEN_BOTTOM_OHMS`.
    Soft bounds narrow the pick (not the list) when some candidate meets them. With
    ``points``, each candidate's operating-point numbers come along.
    Policies: ``centre`` picks the candidate nearest the geometric centre of the
    (soft-narrowed) window on a log scale; ``low-current`` picks the largest.
    Raises :class:`~pullproof.errors.RulesError` for an unknown series or policy.
    """
    rules = network.rules
    soft = list(soft)
    lo, hi = window
    if lo is None and hi is None:
        raise ValueError("recommend() needs at least one side of the window")
    if lo is None:
        assert hi is not None
        lo = min(OPEN_BOTTOM_OHMS, hi / 10)
    if hi is None:
        hi = max(OPEN_TOP_OHMS, 10 * lo)
    lo = max(lo, 1e-3)  # a zero minimum (no power limit) still needs a positive query
    r_lo1, r_hi1 = band(network.resistor, rules, 1.0)  # band of a 1 Ω part: the scale factors
    try:
        cands = eseries.values_between(rules.series, lo / r_lo1, hi / r_hi1) if hi > 0 else []
    except ValueError as exc:
        raise RulesError(f"rules key 'series': {exc}") from None
    if rules.policy not in ("centre", "low-current"):
        raise RulesError(
            f"rules key 'policy': unknown policy {rules.policy!r}; expected centre or low-current"
        )
    tol = network.resistor.tolerance.magnitude("")
    if not cands:
        return Recommendation(
            rules.series,
            tol,
            (),
            None,
            rules.policy,
            f"No {rules.series} value at ±{pct(tol)} fits the window "
            f"{eng(lo, 'Ω')}–{eng(hi, 'Ω')}; use a tighter tolerance or a finer series.",
        )
    s_lo = max([lo, *(_ohms(b) for b in soft if b.kind is BoundKind.MIN)])
    s_hi = min([hi, *(_ohms(b) for b in soft if b.kind is BoundKind.MAX)])
    preferred = [
        c for c in cands if c * r_lo1 >= s_lo * (1 - _REL) and c * r_hi1 <= s_hi * (1 + _REL)
    ]
    pool, (c_lo, c_hi) = (preferred, (s_lo, s_hi)) if preferred else (cands, (lo, hi))
    if rules.policy == "low-current":
        pick = pool[-1]
        why = f"the largest {rules.series} value whose band fits: least current"
    else:
        centre = math.sqrt(c_lo * c_hi)
        # The pool ascends, so the distance from the centre on a log scale falls, then rises:
        # the nearest is one of the two values around the centre (the lower on a tie).
        at = bisect_left(pool, centre)
        pick = min(pool[max(at - 1, 0) : at + 1], key=lambda c: (abs(math.log(c / centre)), c))
        why = f"the {rules.series} value nearest the window's geometric centre {eng(centre, 'Ω')}"
    note = "" if preferred or not soft else " (no value meets the preferred range)"
    return Recommendation(
        rules.series,
        tol,
        tuple(cands),
        pick,
        rules.policy,
        f"{eng(pick, 'Ω')} is {why}{note}.",
        operating_points(network, cands) if points else (),
    )
