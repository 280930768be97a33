"""Compare two reviews of one design (a new revision against an older one).

Networks are paired by resistor reference and net: first where both agree, then by the
resistors alone (the net was renamed), then by the net alone (the resistor was
renumbered). A pair is reported when the value or tolerance changed, a window edge moved
by more than 1 %, the verdict changed, or the rail or direction changed; unpaired networks
are added or removed. Findings are compared by kind, net and parts.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Hashable, Sequence

from .eseries import format_ohms
from .results import Changes, Finding, NetworkChange, NetworkResult, ReviewResult

__all__ = ["WINDOW_CHANGE", "compare_reviews"]

WINDOW_CHANGE = 0.01  # a window edge that moves by more than this fraction is reported


def _refs(r: NetworkResult) -> frozenset[str]:
    return frozenset(r.network.resistor.refs)


def _pair(
    new: Sequence[NetworkResult], old: Sequence[NetworkResult]
) -> tuple[list[tuple[NetworkResult, NetworkResult]], list[NetworkResult], list[NetworkResult]]:
    """Pairs, then the new networks without a partner (added), then the old ones (removed)."""
    keys: tuple[Callable[[NetworkResult], Hashable], ...] = (
        lambda r: (_refs(r), r.network.net),
        _refs,
        lambda r: r.network.net,
    )
    pairs: list[tuple[NetworkResult, NetworkResult]] = []
    left, right = list(new), list(old)
    for key in keys:
        index: dict[Hashable, list[NetworkResult]] = {}
        for r in right:
            index.setdefault(key(r), []).append(r)
        rest = []
        for r in left:
            partners = index.get(key(r))
            if partners:
                partner = partners.pop(0)
                pairs.append((r, partner))
                right.remove(partner)
            else:
                rest.append(r)
        left = rest
    return pairs, left, right


def _value(r: NetworkResult) -> str:
    res = r.network.resistor
    return f"{format_ohms(res.ohms.magnitude('ohm'))} ±{res.tolerance.magnitude('') * 100:g} %"


def _edge(x: float | None, open_word: str) -> str:
    return open_word if x is None else format_ohms(x)


def _moved(a: float | None, b: float | None) -> bool:
    if a is None or b is None:
        return (a is None) != (b is None)
    if b == 0:
        return a != 0
    return abs(a / b - 1) > WINDOW_CHANGE


def _differences(new: NetworkResult, old: NetworkResult) -> tuple[str, ...]:
    out = []
    n, o = new.network, old.network
    if n.net != o.net:
        out.append(f"net {o.net} → {n.net}")
    if _refs(new) != _refs(old):
        out.append(f"resistor {', '.join(o.resistor.refs)} → {', '.join(n.resistor.refs)}")
    if (n.direction, n.rail.name) != (o.direction, o.rail.name):
        out.append(
            f"pull {o.direction.value} to {o.rail.name} → {n.direction.value} to {n.rail.name}"
        )
    nv, ov = n.resistor, o.resistor
    value_same = math.isclose(nv.ohms.magnitude("ohm"), ov.ohms.magnitude("ohm"), rel_tol=1e-9)
    tol_same = math.isclose(nv.tolerance.magnitude(""), ov.tolerance.magnitude(""), rel_tol=1e-9)
    if not (value_same and tol_same):
        out.append(f"value {_value(old)} → {_value(new)}")
    for side, word, (a, b) in (
        ("minimum", "none", (new.window[0], old.window[0])),
        ("maximum", "none", (new.window[1], old.window[1])),
    ):
        if _moved(a, b):
            change = ""
            if a is not None and b is not None and b != 0:
                change = f" ({(a / b - 1) * 100:+.0f} %)"
            out.append(f"window {side} {_edge(b, word)} → {_edge(a, word)}{change}")
    if new.verdict is not old.verdict:
        out.append(f"verdict {old.verdict.value} → {new.verdict.value}")
    return tuple(out)


def _key(r: NetworkResult) -> str:
    return f"{', '.join(r.network.resistor.refs)} on {r.network.net}"


def _finding_key(f: Finding) -> tuple[str, str, frozenset[str]]:
    return (f.kind, f.net, frozenset(f.refs))


def compare_reviews(new: ReviewResult, old: ReviewResult) -> Changes:
    """What changed from ``old`` to ``new`` (both reviews of the same design)."""
    pairs, added, removed = _pair(new.networks, old.networks)
    changes: list[NetworkChange] = []
    unchanged = 0
    for r in added:
        changes.append(NetworkChange(_key(r), r, None, ("added",)))
    for r in removed:
        changes.append(NetworkChange(_key(r), None, r, ("removed",)))
    for a, b in pairs:
        what = _differences(a, b)
        if what:
            changes.append(NetworkChange(_key(a), a, b, what))
        else:
            unchanged += 1
    old_keys = {_finding_key(f) for f in old.findings}
    new_keys = {_finding_key(f) for f in new.findings}
    return Changes(
        old_root=old.root,
        old_files=old.files,
        old_rules_file=old.rules_file,
        networks=tuple(sorted(changes, key=lambda c: c.key)),
        unchanged=unchanged,
        new_findings=tuple(f for f in new.findings if _finding_key(f) not in old_keys),
        resolved_findings=tuple(f for f in old.findings if _finding_key(f) not in new_keys),
    )
