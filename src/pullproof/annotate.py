"""Write review results back into the schematic as hidden ``pullproof.*`` fields.

The original text is spliced, never re-serialised: for each placed resistor symbol
only its own ``(property "pullproof.…" …)`` nodes are removed and inserted, in the
indentation, newline style and field dialect of that file. Every other byte stays
as it was, so removing the fields again (``--remove``) gives back the file as it was
before the first run. Before anything is written, each new text is parsed again and
the circuit rebuilt from the new texts must have the same net partition; files are
then replaced by :mod:`pullproof.writeback` (all or nothing, owner and mode kept).
"""

from __future__ import annotations

import datetime as _dt
import math
import os
from collections.abc import Sequence
from dataclasses import dataclass, replace

from . import __version__
from .circuit import Circuit
from .errors import AnnotateError, PullproofError, SourceText
from .eseries import format_rkm
from .limits import InputPolicy
from .nets import circuit_from_hierarchy, natural_key
from .results import Basis, NetworkResult, ReviewResult, Verdict
from .review import Selection, review
from .schematic.hierarchy import Hierarchy, load_hierarchy
from .schematic.reader import read_text
from .sexpr import Node, parse
from .textfile import Unreadable, read_regular
from .writeback import Replacement, remove_stale, replace_all, stale_temporaries

__all__ = [
    "FIELDS",
    "AnnotateError",
    "AnnotationPlan",
    "FieldChange",
    "FileEdit",
    "apply_annotation",
    "format_plan",
    "plan_annotation",
]

PREFIX = "pullproof."
# The fields annotate owns. Other pullproof.* fields (role, internal_pull, …) are the
# designer's inputs and are never touched.
FIELDS = (
    "pullproof.verdict",
    "pullproof.window",
    "pullproof.recommended",
    "pullproof.reason",
    "pullproof.reviewed",
)
_REVIEWED = "pullproof.reviewed"

# Format versions (file dates) where the field dialect changes, from real files:
# up to v7 (20230121) `hide` is a bare word in effects; v8 (20231120) and v9 (20250114)
# write `(hide yes)` inside effects, one list per line; v10 moves `(hide yes)` up into
# the property itself.
_V8 = 20231120
_V9 = 20250114


@dataclass(frozen=True)
class FieldChange:
    """One field on one symbol: ``old`` None = added, ``new`` None = removed."""

    refs: str  # "R3", or "R5/R105" for a symbol shared by two sheet instances
    name: str
    old: str | None
    new: str | None

    @property
    def action(self) -> str:
        if self.old is None:
            return "add"
        if self.new is None:
            return "remove"
        return "keep" if self.old == self.new else "change"


@dataclass(frozen=True)
class FileEdit:
    """The planned new text of one schematic file."""

    file: str  # as the review names it (relative to the root's folder)
    path: str  # absolute path
    old_text: str
    new_text: str
    changes: tuple[FieldChange, ...]
    notes: tuple[str, ...] = ()

    @property
    def changed(self) -> bool:
        return self.old_text != self.new_text


@dataclass(frozen=True)
class AnnotationPlan:
    """Every file's planned text, checked: parsed again, nets unchanged.

    ``review`` is None for a plan that only removes fields (``remove=True``); ``stale``
    lists temporary files an interrupted earlier run left beside the schematic files.
    """

    root: str
    review: ReviewResult | None
    edits: tuple[FileEdit, ...]
    stale: tuple[str, ...] = ()
    folder: str = ""  # the root's folder (real path): nothing outside it is written …
    allow_outside: bool = False  # … unless the sheets were read with --allow-outside
    remove: bool = False


@dataclass(frozen=True)
class _Target:
    """One placed symbol to annotate: the fields it should carry."""

    file: str
    span: tuple[int, int]
    refs: str
    fields: tuple[tuple[str, str], ...]
    note: str = ""


# -- field values ---------------------------------------------------------------------------


def _round3(x: float, *, up: bool) -> float:
    """Three significant figures, rounded toward the inside of the window."""
    q = 10.0 ** (math.floor(math.log10(x)) - 2)
    n = x / q
    n = float(round(n)) if abs(n - round(n)) < 1e-9 * n else (math.ceil(n) if up else math.floor(n))
    return n * q


def window_text(window: tuple[float | None, float | None]) -> str:
    """The window in the IEC 60062 code, rounded inward to 3 figures: "2K2..141K".

    An open side reads "0" or "∞"; a crossed window "empty: 2K2 > 141K".
    """
    lo, hi = window
    left = "0" if lo is None or lo <= 0 else format_rkm(_round3(lo, up=True))
    right = "∞" if hi is None else format_rkm(_round3(hi, up=False)) if hi > 0 else "0"
    if lo is not None and hi is not None and lo > hi:
        return f"empty: {left} > {right}"
    return f"{left}..{right}"


def _fields(result: NetworkResult, stamp: str) -> tuple[tuple[str, str], ...]:
    rec = result.recommendation
    pick = "none"
    if rec is not None and rec.pick is not None:
        pick = f"{format_rkm(rec.pick)} ({rec.series})"
    reason = " ".join(result.reason.split())
    window = window_text(result.window)
    if result.verdict is Verdict.INCOMPLETE:  # limits that need a missing value are not in it
        window += " (partial)"
    # a verdict resting on an assumption says so wherever it goes
    verdict = result.verdict.value + (" (assumed)" if result.basis is Basis.ASSUMED else "")
    return (
        ("pullproof.verdict", verdict),
        ("pullproof.window", window),
        ("pullproof.recommended", pick),
        ("pullproof.reason", reason),
        (_REVIEWED, stamp),
    )


def _shared_note(pairs: list[tuple[str, NetworkResult]]) -> str:
    """Why one symbol gets the fields of only one of several networks ("" when it has one).

    Two cases put several judged resistors on one symbol: a sheet used twice (R105 and R5
    are one symbol) and a resistor array drawn as one symbol (RN1 (1–2), RN1 (1–3) …).
    The worst verdict's fields are written, so the symbol never looks better than its
    worst element or instance.
    """
    labels = sorted({r for r, _ in pairs})
    if len(labels) < 2:
        return ""
    worst_ref, _ = pairs[0]
    verdicts = {v.verdict for _, v in pairs}
    array = any("(" in r for r in labels)
    why = "elements of one resistor array" if array else "sheet used twice"
    if len(verdicts) > 1:
        listed = ", ".join(f"{r} {v.verdict.value}" for r, v in sorted(pairs))
        return (
            f"{'/'.join(labels)} share one symbol ({why}) with different verdicts "
            f"({listed}); writing the worse, from {worst_ref}"
        )
    if array:  # one symbol, several elements: say whose window and reason it carries
        return (
            f"{'/'.join(labels)} share one symbol ({why}), all {pairs[0][1].verdict.value}; "
            f"writing the fields of {worst_ref}"
        )
    return ""


def _targets(
    circuit: Circuit, result: ReviewResult, select: Selection, stamp: str
) -> dict[tuple[str, tuple[int, int]], _Target]:
    """Map each placed symbol to the fields it gets; a shared symbol takes the worst."""
    judged: dict[tuple[str, tuple[int, int]], list[tuple[str, NetworkResult]]] = {}
    for net in result.networks:
        for el in net.network.resistor.members:
            part = circuit.part(el.ref)
            for pl in part.placements if part is not None else ():
                if el.unit and pl.unit != el.unit:
                    continue  # an array element drawn as its own unit gets its own fields
                judged.setdefault((pl.file, pl.span), []).append((el.label, net))
    out: dict[tuple[str, tuple[int, int]], _Target] = {}
    for key, pairs in judged.items():
        pairs.sort(key=lambda p: (-p[1].verdict.rank, p[0]))
        refs = "/".join(sorted({r for r, _ in pairs}))
        worst = pairs[0][1]
        out[key] = _Target(key[0], key[1], refs, _fields(worst, stamp), _shared_note(pairs))
    # Stale results on resistors no longer judged are removed, so no old verdict lingers.
    for key, target in _removals(circuit, select).items():
        out.setdefault(key, target)
    return out


def _removals(circuit: Circuit, select: Selection) -> dict[tuple[str, tuple[int, int]], _Target]:
    """Every chosen symbol that carries result fields, to be left with none of them."""
    out: dict[tuple[str, tuple[int, int]], _Target] = {}
    for part in circuit.parts:
        if select.active and not select.wants(part):
            continue
        if not any(name in part.fields for name in FIELDS):
            continue
        for pl in part.placements:
            out.setdefault((pl.file, pl.span), _Target(pl.file, pl.span, part.ref, ()))
    return out


# -- splicing -------------------------------------------------------------------------------


def _quote(text: str) -> str:
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n") + '"'


def _version(root: Node) -> int:
    v = root.first("version")
    value = v.atom(0, 0) if v is not None else 0
    return value if isinstance(value, int) else 0


def _line_indent(text: str, pos: int) -> str:
    start = text.rfind("\n", 0, pos) + 1
    head = text[start:pos]
    return head if not head.strip() else ""


def _ws_start(text: str, pos: int) -> int:
    """Where the whitespace run just before ``pos`` starts."""
    while pos > 0 and text[pos - 1] in " \t\r\n":
        pos -= 1
    return pos


class _Dialect:
    """How one file writes a hidden property, read from its version and its own text."""

    def __init__(self, text: str, version: int) -> None:
        self.version = version
        self.newline = "\r\n" if "\r\n" in text else "\n"

    def render(self, name: str, value: str, at: str, pid: int | None, sep: str, unit: str) -> str:
        """One property node; ``sep`` starts each line (newline + indent), or " " inline."""
        head = f"(property {_quote(name)} {_quote(value)}"
        ident = f" (id {pid})" if pid is not None else ""
        at_node = f"(at {at} 0)"
        v = self.version
        if sep == " ":  # a symbol written on one line stays on one line
            if v > _V9:
                return f"{head}{ident} {at_node} (hide yes) (effects (font (size 1.27 1.27))))"
            hide = "(hide yes)" if v >= _V8 else "hide"
            return f"{head}{ident} {at_node} (effects (font (size 1.27 1.27)) {hide}))"
        i1, i2, i3 = sep + unit, sep + unit * 2, sep + unit * 3
        if v > _V9:
            return (
                f"{head}{ident}{i1}{at_node}{i1}(hide yes){i1}(effects{i2}(font"
                f"{i3}(size 1.27 1.27){i2}){i1}){sep})"
            )
        if v >= _V8:
            return (
                f"{head}{ident}{i1}{at_node}{i1}(effects{i2}(font"
                f"{i3}(size 1.27 1.27){i2}){i2}(hide yes){i1}){sep})"
            )
        return f"{head}{ident} {at_node}{i1}(effects (font (size 1.27 1.27)) hide){sep})"


def _own_fields(sym: Node) -> dict[str, tuple[str, Node]]:
    out: dict[str, tuple[str, Node]] = {}
    for p in sym.nodes("property"):
        key, value = p.atom(0), p.atom(1)
        if isinstance(key, str) and key in FIELDS:
            out[key] = (value if isinstance(value, str) else "", p)
    return out


def _splice_symbol(
    text: str, sym: Node, target: _Target, dialect: _Dialect
) -> tuple[list[tuple[int, int, str]], list[FieldChange]]:
    """The (start, end, replacement) cuts for one symbol, and its field changes."""
    old = _own_fields(sym)
    wanted = dict(target.fields)
    if _REVIEWED in wanted and _REVIEWED in old:
        # The stamp says which run produced these values: keep it while they are unchanged.
        same = all(old.get(k, ("",))[0] == v for k, v in wanted.items() if k != _REVIEWED)
        if same:
            wanted[_REVIEWED] = old[_REVIEWED][0]
    changes = [FieldChange(target.refs, n, old[n][0] if n in old else None, wanted[n])
               for n in FIELDS if n in wanted]  # fmt: skip
    changes += [FieldChange(target.refs, n, old[n][0], None) for n in FIELDS
                if n in old and n not in wanted]  # fmt: skip
    if all(c.action == "keep" for c in changes):
        return [], changes
    cuts = [(_ws_start(text, node.span[0]), node.span[1], "") for _, node in old.values()]
    cuts.sort()
    props = [p for p in sym.nodes("property") if p.atom(0) not in FIELDS]
    anchor = props[-1] if props else (sym.first("at") or sym)
    insert_at = cuts[0][0] if cuts else anchor.span[1]
    one_line = "\n" not in text[sym.span[0] : sym.span[1]]
    if one_line:
        sep, unit = " ", ""
    else:
        indent = _line_indent(text, anchor.span[0]) if props else ""
        outer = _line_indent(text, sym.span[0])
        if not indent:
            indent = outer + ("\t" if "\t" in outer else "  ")
        unit = "\t" if "\t" in indent else indent[len(outer) :] or "  "
        sep = dialect.newline + indent
    ids = [p.first("id") for p in props]
    numbers = [int(n.atom(0)) for n in ids if n is not None and isinstance(n.atom(0), int)]
    next_id: int | None = max(numbers) + 1 if numbers else None
    at = sym.first("at")
    # the symbol's own position, copied as written (no float round trip)
    where = " ".join(text[at.span[0] + 1 : at.span[1] - 1].split()[1:3]) if at else "0 0"
    block = []
    for name in FIELDS:
        if name in wanted:
            block.append(sep + dialect.render(name, wanted[name], where, next_id, sep, unit))
            next_id = next_id + 1 if next_id is not None else None
    if cuts:
        first = cuts[0]
        cuts[0] = (first[0], first[1], "".join(block))
    else:
        cuts.append((insert_at, insert_at, "".join(block)))
    return cuts, changes


def _unmarked(text: str) -> str:
    """The reader turns a byte-order mark into a space of the same length; so do we."""
    return " " + text[1:] if text.startswith("\ufeff") else text


def _edit_file(path: str, targets: Sequence[_Target], read: SourceText, max_bytes: int) -> FileEdit:
    """The planned text of one file; ``read`` is its text as the review read it."""
    display = read.name
    try:
        text = read_regular(path, max_bytes).decode("utf-8")
    except (Unreadable, UnicodeDecodeError) as exc:
        raise AnnotateError(f"{display}: cannot read the file again: {exc}; nothing written"
                            ) from None  # fmt: skip
    if _unmarked(text) != read.text:
        raise AnnotateError(f"{display}: the file changed while it was reviewed; nothing written")
    root = parse(_unmarked(text), display)
    by_span = {n.span: n for n in root.nodes("symbol")}
    dialect = _Dialect(text, _version(root))
    cuts: list[tuple[int, int, str]] = []
    changes: list[FieldChange] = []
    for t in sorted(targets, key=lambda t: t.span):
        sym = by_span.get(t.span)
        if sym is None:
            loc = SourceText(display, text).locate(t.span[0])
            raise AnnotateError(f"the symbol of {t.refs} is not where it was read; nothing written",
                                loc)  # fmt: skip
        c, ch = _splice_symbol(text, sym, t, dialect)
        cuts.extend(c)
        changes.extend(ch)
    new = text
    for start, end, repl in sorted(cuts, reverse=True):
        new = new[:start] + repl + new[end:]
    notes = tuple(t.note for t in targets if t.note)
    file = targets[0].file
    return FileEdit(file, path, text, new, tuple(changes), notes)


# -- checking -------------------------------------------------------------------------------


def _partition(circuit: Circuit) -> set[frozenset[tuple[str, str]]]:
    return {frozenset((m.ref, m.pin) for m in n.members) for n in circuit.nets}


def _check(root: str, hier: Hierarchy, circuit: Circuit, edits: Sequence[FileEdit]) -> None:
    """Parse every new text and rebuild the circuit from them: the nets must not change."""
    new_by_path = {e.path: e for e in edits}
    models = dict(hier.models)
    texts = dict(hier.texts)
    for key, path in hier.absolute.items():
        edit = new_by_path.get(path)
        if edit is None or not edit.changed:
            continue
        name = texts[key].name
        try:
            model = read_text(_unmarked(edit.new_text), name)
        except PullproofError as exc:
            raise AnnotateError(f"{name}: the annotated text does not read back ({exc}); "
                                "nothing written") from None  # fmt: skip
        if [(b.file, b.uuid) for b in model.sheets] != [
            (b.file, b.uuid) for b in hier.models[key].sheets
        ]:
            raise AnnotateError(f"{name}: the annotated text changes the sheets; nothing written")
        models[key] = model
        texts[key] = SourceText(name, edit.new_text)
    after = circuit_from_hierarchy(replace(hier, models=models, texts=texts), root)
    if _partition(after) != _partition(circuit):
        raise AnnotateError(f"{root}: the annotated text would change the nets; nothing written")


# -- the plan -------------------------------------------------------------------------------


def plan_annotation(
    root: str | os.PathLike[str],
    *,
    rules: str | os.PathLike[str] | None = None,
    parts: Sequence[str | os.PathLike[str]] = (),
    select: Selection | None = None,
    today: _dt.date | None = None,
    policy: InputPolicy | None = None,
    remove: bool = False,
    assume: str | None = None,
) -> AnnotationPlan:
    """Review ``root`` and work out every file's annotated text; nothing is written.

    Args:
        root: the root schematic file.
        rules, parts, select, policy, assume: as for :func:`pullproof.review.review`.
        today: the date in ``pullproof.reviewed`` (default: today).
        remove: plan to take every result field out again instead (no review is run,
            so rules and part libraries are not read).

    Raises:
        PullproofError: the review fails (malformed input), or the annotated text
            would not read back with the same nets (:class:`AnnotateError`).
    """
    select = select or Selection()
    policy = policy or InputPolicy()
    # Read the files once: the hierarchy feeds the review and the read-back check.
    hier = load_hierarchy(root, policy)
    circuit = circuit_from_hierarchy(hier, os.fspath(root))
    result = None
    if remove:
        targets = _removals(circuit, select)
    else:
        result = review(root, rules=rules, parts=parts, select=select, circuit=circuit,
                        hierarchy=hier, assume=assume)  # fmt: skip
        stamp = f"pullproof {__version__}, {(today or _dt.date.today()).isoformat()}"
        targets = _targets(circuit, result, select, stamp)
    by_file: dict[str, list[_Target]] = {}
    for t in targets.values():
        by_file.setdefault(t.file, []).append(t)
    edits = [
        _edit_file(circuit.files[f], by_file[f], hier.texts[f], policy.max_file_bytes)
        for f in sorted(by_file)
    ]
    _check(os.fspath(root), hier, circuit, edits)
    return AnnotationPlan(
        root=os.fspath(root),
        review=result,
        edits=tuple(edits),
        stale=stale_temporaries(hier.absolute.values()),
        folder=os.path.dirname(hier.absolute[hier.root_key]),
        allow_outside=policy.allow_outside,
        remove=remove,
    )


def apply_annotation(plan: AnnotationPlan, *, backup: bool = False) -> tuple[str, ...]:
    """Write every changed file of ``plan``, all or none; return the files written.

    Temporary files that an interrupted earlier run left (``plan.stale``) are removed
    first. With ``backup`` each file's text before this run is kept as ``FILE.bak``.

    Raises:
        AnnotateError: a file is read-only, hard-linked, owned by another user, outside
            the root's folder, changed on disk since it was read, or cannot be written;
            the originals are left as they were.
    """
    remove_stale(plan.stale)
    edits = [e for e in plan.edits if e.changed]
    for e in edits:
        if not plan.allow_outside and os.path.commonpath([e.path, plan.folder]) != plan.folder:
            raise AnnotateError(f"{e.path}: outside the folder of the root schematic; "
                                "nothing written (see --allow-outside)")  # fmt: skip
    replace_all(
        [
            Replacement(e.path, e.old_text.encode("utf-8"), e.new_text.encode("utf-8"), backup)
            for e in edits
        ]
    )
    return tuple(e.file for e in edits)


# -- the summary ----------------------------------------------------------------------------

_ORDER = {"add": 0, "change": 1, "remove": 2}


def format_plan(plan: AnnotationPlan, *, written: bool) -> str:
    """The per-file list of fields added, changed and removed, then a one-line summary."""
    lines = [
        f"pullproof annotate {plan.root}"
        + ("" if written else " (dry run: nothing written; add --write to write)"),
        "",
    ]
    counts = {"add": 0, "change": 0, "remove": 0}
    refs: set[str] = set()
    files = 0
    for e in plan.edits:
        shown = [c for c in e.changes if c.action != "keep"]
        if not shown and not e.notes:
            continue
        files += 1 if shown else 0
        lines.append(f"{e.file}:")
        for c in sorted(shown, key=lambda c: (natural_key(c.refs), _ORDER[c.action])):
            counts[c.action] += 1
            refs.add(c.refs)
            if c.action == "add":
                what = f"= {c.new}"
            elif c.action == "change":
                what = f"{c.old} -> {c.new}"
            else:
                why = "removed on request" if plan.remove else "no longer judged"
                what = f"(was {c.old}; {why})"
            lines.append(f"  {c.refs:<8} {c.action:<7} {c.name:<22} {what}")
        lines.extend(f"  note: {n}" for n in e.notes)
    for t in plan.stale:
        done = "removed" if written else "found (--write removes it)"
        lines.append(f"{done} a temporary file left by an interrupted run: {t}")
    if not any(counts.values()):
        lines.append(
            "no result fields to remove; nothing to write"
            if plan.remove
            else "every field is up to date; nothing to write"
        )
    verb = "wrote" if written else "would write"
    lines.append(
        f"{verb} {counts['add']} new, {counts['change']} changed and {counts['remove']} removed "
        f"fields on {len(refs)} symbols in {files} files"
    )
    return "\n".join(lines) + "\n"
