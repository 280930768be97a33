"""The HTML design note: one self-contained page that explains every verdict of a review.

:func:`render_note` turns a :class:`~pullproof.results.ReviewResult` into HTML
text; :func:`write_note` writes it atomically. The page has inline CSS and SVG
only (no script, nothing fetched), so an archived note reads the same in years.
The templates live in the top-level ``templates/`` folder (shipped in the wheel
as ``pullproof/templates``); they iterate over bounds and checks generically, so
a new constraint shows up without a template change.
"""

from __future__ import annotations

import datetime
import hashlib
import os
import re
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Any

import jinja2
from markupsafe import Markup

from .. import __version__
from ..errors import PullproofError
from ..hazard import safety_caution
from ..network import Missing, PullNetwork
from ..provenance import Sourced
from ..results import (
    Assumption,
    Basis,
    Bound,
    BoundKind,
    Check,
    Figure,
    Finding,
    NetworkResult,
    ReviewResult,
    Verdict,
)
from ..textfile import write_report
from . import note_html, note_rows, note_summary, note_tags
from .chart import chart_text, window_chart
from .format import (
    format_margin,
    format_ohms,
    format_percent,
    format_sourced,
    format_value,
    format_window,
)
from .note_html import format_rkm

__all__ = [
    "FileDigest",
    "note_context",
    "note_environment",
    "render_note",
    "write_note",
]

TEMPLATE = "note.html.j2"


@dataclass(frozen=True)
class FileDigest:
    """One file the review read, with its SHA-256 (or why it could not be hashed now)."""

    label: str
    path: str
    sha256: str | None
    problem: str = ""


@dataclass(frozen=True)
class ProvEntry:
    """A numbered provenance entry of one network."""

    number: int
    symbol: str
    value: str
    where: str
    origin: str
    status: str
    reason: str


@dataclass(frozen=True)
class TermRef:
    """A formula term as shown in a row: symbol, formatted value, provenance number."""

    symbol: str
    value: str
    ref: int


@dataclass(frozen=True)
class LimitRow:
    """One row of a network's constraint table (a bound on R, or an R-independent check)."""

    title: str
    constraint: str
    formula: str
    substituted: str
    terms: tuple[TermRef, ...]
    limit: str  # "R_lo ≥ 551 Ω", "not computed", or "—" for a check
    hard: bool
    met: bool | None  # None: could not be evaluated
    outcome: str  # words beside the met/not-met mark
    binding: bool
    source: str
    explanation: str
    corner: str
    missing: tuple[Missing, ...]
    assumed: tuple[str, ...] = ()  # the assumed values the row rests on (an input's, a rail's)


@dataclass(frozen=True)
class AssumedRow:
    """One line of the "Assumed values to confirm" table: an assumed number and the
    networks whose verdicts rest on it."""

    part: str
    pin: str
    quantity: str
    value: str
    basis: str
    fix: str
    status: str
    networks: tuple[tuple[str, str], ...]  # (anchor, net)


@dataclass(frozen=True)
class CircuitRow:
    """A line of the circuit in words, with the provenance of its numbers."""

    label: str
    text: str
    values: tuple[TermRef, ...]


@dataclass(frozen=True)
class FigureView:
    """A column of the operating-point table: what it is, and its formula at the fitted value."""

    title: str
    formula: str
    substituted: str
    value: str
    terms: tuple[TermRef, ...]
    note: str
    missing: tuple[Missing, ...]


@dataclass(frozen=True)
class OperatingView:
    """The operating-point table of one network."""

    columns: tuple[FigureView, ...]
    result: NetworkResult  # whose operating points the rows show
    cols: Markup  # a <col> per column
    heads: Markup  # a <th> per column, its title

    @property
    def rows(self) -> Markup:
        """The table's rows as HTML: the fitted value ("fitted R10"), then every candidate,
        the pick ("E24 pick") marked. 46 rows of 7 cells a network are too many for the
        template, and are written when the template places them (see NetworkView.chart)."""
        return Markup(_point_rows(self.result))


@dataclass(frozen=True)
class NetworkView:
    """Everything the template shows for one network."""

    anchor: str
    result: NetworkResult
    circuit: tuple[CircuitRow, ...]
    rows: tuple[LimitRow, ...]
    provenance: tuple[ProvEntry, ...]
    chart_text: str
    value_text: str
    refs_text: str
    operating: OperatingView | None = None

    @property
    def chart(self) -> Markup:
        """The window chart, drawn when the template places it: 30 kB a network that a
        large board's note would otherwise hold in memory until the page is joined."""
        return Markup(window_chart(self.result, self.chart_text))


@dataclass(frozen=True)
class FindingView:
    anchor: str
    finding: Finding
    target: str  # the network section's anchor for the same net, or ""


class _Registry:
    """Numbers each distinct (symbol, value, source) of one network once."""

    def __init__(self) -> None:
        self._index: dict[tuple[str, str, str, str, str], TermRef] = {}
        self._entries: list[ProvEntry] = []
        # The same Sourced objects recur across limits, checks and the operating point:
        # read and format each once (keyed by identity; the entry holds it alive while the
        # registry is in use).
        self._seen: dict[int, tuple[Sourced, str, str, str, str, str]] = {}

    def ref(self, symbol: str, value: Sourced) -> TermRef:
        known = self._seen.get(id(value))
        if known is None or known[0] is not value:
            src = value.source
            text = format_sourced(value)
            known = (value, text, src.where, src.status.value, src.reason, src.origin.value)
            self._seen[id(value)] = known
        _, text, where, status, reason, origin = known
        key = (symbol, text, where, status, reason)
        term = self._index.get(key)
        if term is None:
            number = len(self._entries) + 1
            self._entries.append(ProvEntry(number, symbol, text, where, origin, status, reason))
            term = self._index[key] = TermRef(symbol, text, number)
        return term

    def entries(self) -> tuple[ProvEntry, ...]:
        return tuple(self._entries)


def _slug(text: str, prefix: str, taken: set[str]) -> str:
    """A stable, unique HTML id from a net name: "/vents/VENT_LIMIT" → "net-vents-vent-limit"."""
    base = f"{prefix}-" + (re.sub(r"[^a-z0-9]+", "-", text.lower()).strip("-") or "x")
    anchor, n = base, 2
    while anchor in taken:
        anchor, n = f"{base}-{n}", n + 1
    taken.add(anchor)
    return anchor


def _circuit(net: PullNetwork, reg: _Registry) -> tuple[CircuitRow, ...]:
    rail, res = net.rail, net.resistor
    rows = [
        CircuitRow("Net", f"{net.net} on sheet {net.sheet}", ()),
        CircuitRow(
            "Pull",
            f"{net.direction.value} to {rail.name}" + (" (ground)" if rail.ground else ""),
            (
                reg.ref("V_min", rail.v_min),
                reg.ref("V_nom", rail.v_nom),
                reg.ref("V_max", rail.v_max),
            ),
        ),
    ]
    extras = [f"size {res.size}"] if res.size else []
    vals = [reg.ref("R", res.ohms), reg.ref("tol", res.tolerance), reg.ref("TCR", res.tcr)]
    if res.power_rating is not None:
        vals.append(reg.ref("P_rated", res.power_rating))
    if res.working_voltage is not None:
        vals.append(reg.ref("V_working", res.working_voltage))
    label = "Resistors" if len(res.refs) > 1 else "Resistor"
    rows.append(
        CircuitRow(label, " ∥ ".join(res.refs) + "".join(f", {e}" for e in extras), tuple(vals))
    )
    for inp in net.inputs:
        words = [
            f"{inp.ref} pin {inp.pin}",
            f"family {inp.family}" if inp.family else "family unknown",
        ]
        if inp.schmitt:
            words.append("Schmitt trigger")
        if not inp.same_supply_as_pull:
            words.append("powered from another supply")
        vals = []
        if inp.series_ohms is not None:
            words.append(f"through series resistor {inp.series_ref}")
            vals.append(reg.ref("R_series", inp.series_ohms))
        if inp.internal_pull is not None:
            way = inp.internal_pull_direction.value if inp.internal_pull_direction else "?"
            words.append(f"internal pull-{way} enabled")
            vals += [
                reg.ref("R_int,min", inp.internal_pull[0]),
                reg.ref("R_int,max", inp.internal_pull[1]),
            ]
        rows.append(CircuitRow("Input", ", ".join(words), tuple(vals)))
    for sw in net.switches:
        against = (
            "closing drives the line against the pull"
            if sw.pulls_against
            else "same side as the pull"
        )
        vals = [
            reg.ref(sym, v)
            for sym, v in (
                ("I_contact,max", sw.contact_max),
                ("I_wet,min", sw.wetting_min),
                ("t_bounce", sw.bounce_time),
            )
            if v is not None
        ]
        rows.append(CircuitRow("Switch", f"{sw.ref} to {sw.other_side}; {against}", tuple(vals)))
    for dr in net.drivers:
        pairs = (
            ("I_OL", dr.i_ol),
            ("V_OL", dr.v_ol),
            ("I_off", dr.i_off),
            ("CTR_min", dr.ctr_min),
            ("ageing", dr.ageing),
            ("I_F,min", dr.i_f_min),
            ("V_CE(sat)", dr.vce_sat),
        )
        vals = [reg.ref(sym, v) for sym, v in pairs if v is not None]
        rows.append(CircuitRow("Driver", f"{dr.ref} pin {dr.pin}, {dr.kind}", tuple(vals)))
    for cap in net.capacitors:
        rows.append(CircuitRow("Capacitor", f"{cap.ref} to {cap.to}", (reg.ref("C", cap.farads),)))
    if net.opposite_rail is not None:
        r = net.opposite_rail
        rows.append(
            CircuitRow(
                "Opposite rail", r.name, (reg.ref("V_min", r.v_min), reg.ref("V_max", r.v_max))
            )
        )
    return tuple(rows)


def _rows(nr: NetworkResult, reg: _Registry) -> tuple[LimitRow, ...]:
    lo, hi = nr.band
    out: list[LimitRow] = []
    ref = reg.ref
    sides = [w for w in nr.window if w is not None]
    for b in nr.bounds:
        terms = tuple([ref(t.symbol, t.value) for t in b.terms])
        side = "R_lo" if b.kind is BoundKind.MIN else "R_hi"
        sign = "≥" if b.kind is BoundKind.MIN else "≤"
        if b.ohms is None:
            limit, met, outcome = "not computed", None, "a value is missing"
        else:
            limit = f"{side} {sign} {format_ohms(b.ohms)}"
            end = lo if b.kind is BoundKind.MIN else hi
            met = end >= b.ohms if b.kind is BoundKind.MIN else end <= b.ohms
            outcome = f"{side} = {format_ohms(end)}"
        binding = (
            (b.hard or bool(b.assumed))
            and b.ohms is not None
            and b.constraint in nr.binding
            and any(abs(b.ohms - w) <= 1e-9 * max(abs(w), 1.0) for w in sides)
        )
        out.append(
            LimitRow(
                b.title,
                b.constraint,
                b.formula,
                b.substituted,
                terms,
                limit,
                b.hard,
                met,
                outcome,
                binding,
                b.source,
                b.explanation,
                b.corner,
                b.missing,
                b.assumed,
            )
        )
    for c in nr.checks:
        terms = tuple([ref(t.symbol, t.value) for t in c.terms])
        outcome = (
            f"{c.sentence[:1].upper()}{c.sentence[1:]}."
            if c.sentence
            else {True: "holds", False: "violated", None: "a value is missing"}[c.ok]
        )
        out.append(
            LimitRow(
                c.title,
                c.constraint,
                c.formula,
                c.substituted,
                terms,
                "independent of R",
                c.hard,
                c.ok,
                outcome,
                False,
                c.source,
                c.explanation,
                "",
                c.missing,
                c.assumed,
            )
        )
    return tuple(out)


_COLUMNS = (
    "Current while held",
    "Least contact current",
    "Dissipation while held",
    "Idle level",
    "Edge time",
)


def _cell(f: Figure) -> str:
    number = f.number
    if number is not None:
        return format_value(number, f.unit)
    return "unknown" if f.missing else "—"


def _operating(nr: NetworkResult, reg: _Registry) -> OperatingView | None:
    """The fitted value's operating point, then every recommended candidate's."""
    op = nr.operating
    if op is None:
        return None
    columns = []
    for title, f in zip(_COLUMNS, op.figures, strict=True):
        title = "Rise time (I2C)" if f.symbol == "t_r" else title
        columns.append(
            FigureView(title, f.formula, f.substituted, _cell(f),
                       tuple([reg.ref(t.symbol, t.value) for t in f.terms]), f.note, f.missing)
        )  # fmt: skip
    cols = '<col style="width:13.2%">' * len(columns)
    heads = "".join([f'<th class="num">{note_html.esc(c.title)}</th>' for c in columns])
    return OperatingView(tuple(columns), nr, Markup(cols), Markup(heads))


def _point_rows(nr: NetworkResult) -> str:
    op = nr.operating
    assert op is not None  # an OperatingView exists only for a network with one
    refs = "/".join(nr.network.resistor.refs)
    fit = op.values()
    # the fitted row's cells come from its figures: "unknown" where a value is missing
    cells = "".join([f'<td class="num">{note_html.esc(_cell(f))}</td>' for f in op.figures])
    row = note_html.point_row(f"fitted {refs}", fit.ohms, fit.band, cells, fitted=True, pick=False)
    rec = nr.recommendation
    if rec is None:
        return row
    return row + note_html.candidate_rows(rec.points, rec.pick, rec.series)


def _network_view(nr: NetworkResult, anchor: str) -> NetworkView:
    reg = _Registry()
    circuit = _circuit(nr.network, reg)
    rows = _rows(nr, reg)
    operating = _operating(nr, reg)
    res = nr.network.resistor
    value = (
        f"{format_ohms(res.ohms.magnitude('ohm'))} ±{format_percent(res.tolerance.magnitude(''))}"
    )
    words = chart_text(nr)
    return NetworkView(
        anchor,
        nr,
        circuit,
        rows,
        reg.entries(),
        words,
        value,
        ", ".join(res.refs),
        operating,
    )


def _digest(label: str, path: str) -> FileDigest:
    h = hashlib.sha256()
    try:
        with open(path, "rb") as f:
            for block in iter(lambda: f.read(1 << 16), b""):
                h.update(block)
    except OSError as e:
        return FileDigest(label, path, None, f"not readable now ({e.strerror or e})")
    return FileDigest(label, path, h.hexdigest())


def _formulas(result: ReviewResult) -> list[dict[str, str]]:
    """Every distinct formula used in the review, with its source, for the appendix."""
    seen: dict[tuple[str, str], dict[str, str]] = {}
    for nr in result.networks:
        items: tuple[Bound | Check, ...] = (*nr.bounds, *nr.checks)
        for item in items:
            key = (item.title, item.formula)
            seen.setdefault(
                key,
                {
                    "title": item.title,
                    "formula": item.formula,
                    "source": item.source or "not stated",
                    "hard": "hard" if item.hard else "soft",
                },
            )
    return sorted(seen.values(), key=lambda d: (d["title"], d["formula"]))


def _counts(verdicts: Iterable[Verdict]) -> list[tuple[str, int]]:
    counts = dict.fromkeys((v.value for v in sorted(Verdict, key=lambda v: -v.rank)), 0)
    for v in verdicts:
        counts[v.value] += 1
    return [(k, n) for k, n in counts.items() if n]


def note_context(
    result: ReviewResult,
    *,
    title: str,
    author: str = "",
    date: str | None = None,
    version: str = __version__,
) -> dict[str, Any]:
    """The template variables for ``result`` (also used by tests of custom templates)."""
    taken: set[str] = {
        "summary", "findings", "cautions", "method", "files", "skipped", "changes", "warnings",
        "assumptions",
    }  # fmt: skip
    order = sorted(result.networks, key=lambda n: (-n.verdict.rank, n.network.net))
    views = [_network_view(nr, _slug(nr.network.net, "net", taken)) for nr in order]
    by_net = {v.result.network.net: v.anchor for v in views}
    findings = [
        FindingView(_slug(f.net, "finding", taken), f, by_net.get(f.net, ""))
        for f in sorted(result.findings, key=lambda f: (-f.severity.rank, f.net, f.kind))
    ]
    files = [_digest(label, path) for label, path in result.files]
    rules = _rules_digest(result.rules_file)
    marks = [n.accepted for n in result.networks] + [f.accepted for f in result.findings]
    return {
        "title": title,
        "author": author,
        "date": date if date is not None else datetime.date.today().isoformat(),
        "version": version,
        "result": result,
        "worst": result.worst,
        "networks": views,
        "findings": findings,
        "skipped": sorted(result.skipped, key=lambda s: (s.ref, s.element, s.net)),
        "files": files,
        "rules": rules,
        "formulas": _formulas(result),
        "network_counts": _counts(n.verdict for n in result.networks),
        "mains_count": sum(1 for n in result.networks if n.network.mains_adjacent),
        "hazardous": result.hazardous_nets,
        "resistor_voltages": result.resistor_voltages,
        "safety_caution": safety_caution(result),
        "gate": result.gate,
        "accepted_count": sum(1 for m in marks if m is not None and m.holds),
        "changes": _changes_view(result, by_net),
        "assumptions": _assumed_rows(views),
        "assumed_count": sum(1 for n in result.networks if n.basis is Basis.ASSUMED),
        "assume": result.assume,
    }


def _assumed_row(a: Assumption, nets: list[tuple[str, str]]) -> AssumedRow:
    text = a.text or format_sourced(a.value)
    status = a.value.source.status.value
    return AssumedRow(a.part, a.pin, a.quantity, text, a.basis, a.fix, status, tuple(nets))


def _assumed_rows(views: list[NetworkView]) -> list[AssumedRow]:
    """Every assumed number of the review once, with the networks resting on it."""
    rows: dict[tuple[str, str, str, str], tuple[Assumption, list[tuple[str, str]]]] = {}
    for v in views:
        for a in v.result.assumptions:
            entry = rows.setdefault(a.key, (a, []))
            pair = (v.anchor, v.result.network.net)
            if pair not in entry[1]:
                entry[1].append(pair)
    out = [_assumed_row(a, nets) for a, nets in rows.values()]
    # the parts' numbers first (the datasheets to open), then rails, then the defaults
    return sorted(out, key=lambda r: (r.basis == "default", not r.part, r.part, r.pin, r.quantity))


def _rules_digest(path: str | None) -> FileDigest | None:
    return None if path is None else _digest(os.path.basename(path), path)


def _changes_view(result: ReviewResult, anchors: dict[str, str]) -> dict[str, Any] | None:
    """The "Changes since" section: the comparison and the older revision's file digests."""
    c = result.changes
    if c is None:
        return None
    return {
        "record": c,
        "old_root": c.old_root,
        "old_files": [_digest(label, path) for label, path in c.old_files],
        "old_rules": _rules_digest(c.old_rules_file),
        "anchors": anchors,
    }


def _template_dir() -> Path | None:
    """The repo's top-level templates/ when running from a source checkout."""
    here = Path(__file__).resolve().parents[3] / "templates"
    return here if (here / TEMPLATE).is_file() else None


def note_environment(directory: Path | None = None) -> jinja2.Environment:
    """A jinja2 environment for the note: autoescape on, undefined variables are errors.

    ``directory`` overrides where templates are read from (tests use it); by
    default the installed ``pullproof/templates`` is used, falling back to the
    source checkout's top-level ``templates/``.
    """
    loader: jinja2.BaseLoader
    if directory is not None:
        loader = jinja2.FileSystemLoader(str(directory))
    elif resources.files("pullproof").joinpath("templates", TEMPLATE).is_file():
        loader = jinja2.PackageLoader("pullproof", "templates")
    else:
        fallback = _template_dir()
        if fallback is None:
            raise PullproofError("the note templates are missing from this installation")
        loader = jinja2.FileSystemLoader(str(fallback))
    env = jinja2.Environment(
        loader=loader,
        autoescape=True,
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
    )
    env.filters.update(
        ohms=format_ohms,
        qty=format_sourced,
        pct=format_percent,
        window=format_window,
        margin=format_margin,
        rkm=format_rkm,
        capitalize_first=_capitalize_first,
    )
    # Python-built fragments of the repeated rows (same bytes as the loops they replace)
    env.globals.update(
        candidate_list=note_html.candidates,
        term_list=note_html.terms,
        term_items=note_html.term_items,
        provenance_list=note_html.provenance,
        limit_rows=note_rows.limit_rows,
        figure_list=note_rows.figure_list,
        missing_list=note_rows.missing_list,
        assumption_items=note_rows.assumption_items,
        network_links=note_rows.network_links,
        circuit_list=note_rows.circuit_list,
        verdict=note_tags.verdict,
        assumed=note_tags.assumed,
        accepted=note_tags.accepted,
        summary_rows=note_summary.summary_rows,
        recommendation=note_summary.recommendation,
        assumed_value_rows=note_summary.assumed_value_rows,
        network_head=note_summary.network_head,
        numbers_row=note_summary.numbers_row,
    )
    return env


def _capitalize_first(text: str) -> str:
    """The sentence with its first letter upper-case (the rest untouched: net names keep case)."""
    return text[:1].upper() + text[1:]


@lru_cache(maxsize=1)
def _default_environment() -> jinja2.Environment:
    return note_environment()


def render_note(
    result: ReviewResult,
    *,
    title: str,
    author: str = "",
    date: str | None = None,
    version: str = __version__,
) -> str:
    """Render the design note of ``result`` as one self-contained HTML document.

    ``date`` defaults to today (ISO 8601); ``version`` is the tool version
    printed in the header. Raises :class:`PullproofError` when the templates
    are missing from the installation.
    """
    return "".join(stream_note(result, title=title, author=author, date=date, version=version))


def stream_note(
    result: ReviewResult,
    *,
    title: str,
    author: str = "",
    date: str | None = None,
    version: str = __version__,
) -> Iterator[str]:
    """The design note in pieces as the template makes them (:func:`render_note` joins
    them). The context is built, and the template found, before this returns."""
    context = note_context(result, title=title, author=author, date=date, version=version)
    return _default_environment().get_template(TEMPLATE).generate(**context)


def write_note(result: ReviewResult, path: str | os.PathLike[str], **kw: Any) -> None:
    """Render and write the note to ``path`` atomically.

    The text goes to a temporary file in the same folder, which then replaces
    ``path``; a failure never leaves a half-written note. Refuses to overwrite a
    file the review read (a schematic or the rules file). Keyword arguments are
    those of :func:`render_note`. Raises :class:`PullproofError` when the file
    cannot be written.
    """
    write_report(path, stream_note(result, **kw), "note", result.inputs)
