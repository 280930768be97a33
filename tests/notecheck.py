"""Structural checks of a rendered design note, reusable for any ReviewResult.

``check_note_html(html, result)`` parses the note with the standard library's
html.parser and returns a list of problems (empty when the note is sound): every
network has its section and summary link, every formula term refers to a
provenance entry of its own section, charts carry a text equivalent, the mains
caution sits exactly on the mains-adjacent networks, the operating-point table has a row
for the fitted value and one per recommended value with its formulas referenced, file
digests match, and
nothing in the page runs script or fetches from a network.
"""

from __future__ import annotations

import hashlib
from collections import Counter
from dataclasses import dataclass, field
from html.parser import HTMLParser

from pullproof.results import ReviewResult

VOID = frozenset(
    {
        "area",
        "base",
        "br",
        "col",
        "embed",
        "hr",
        "img",
        "input",
        "link",
        "meta",
        "param",
        "source",
        "track",
        "wbr",
    }
)


@dataclass
class Section:
    """What the parser saw inside one ``section.network``."""

    anchor: str
    refs: list[tuple[int, str]] = field(default_factory=list)  # (data-ref, href) in limit rows
    prov_ids: set[str] = field(default_factory=set)
    svgs: int = 0
    svg_titles: int = 0
    svg_descs: int = 0
    mains: int = 0
    op_rows: int = 0  # rows of the operating-point table
    op_refs: list[tuple[int, str]] = field(default_factory=list)  # refs in its formulas
    verdicts: list[str] = field(default_factory=list)
    heading: str = ""


class NoteParser(HTMLParser):
    """Collects ids, links, sections and the flags the checks need."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.stack: list[tuple[str, dict[str, str]]] = []
        self.ids: list[str] = []
        self.hrefs: list[str] = []
        self.srcs: list[str] = []
        self.tags: Counter[str] = Counter()
        self.sections: list[Section] = []
        self.text: list[str] = []
        self._section_depth: int | None = None
        self._heading = False

    def _inside(self, tag: str, cls: str) -> bool:
        return any(t == tag and cls in a.get("class", "").split() for t, a in self.stack)

    def _open(self, tag: str, attrs: dict[str, str]) -> None:
        self.tags[tag] += 1
        if "id" in attrs:
            self.ids.append(attrs["id"])
        if "href" in attrs:
            self.hrefs.append(attrs["href"])
        for key in ("src", "xlink:href", "srcset", "data"):
            if key in attrs:
                self.srcs.append(attrs[key])
        classes = attrs.get("class", "").split()
        if tag == "section" and "network" in classes:
            self.sections.append(Section(attrs.get("id", "")))
            self._section_depth = len(self.stack)
        sec = self.sections[-1] if self._section_depth is not None else None
        if sec is None:
            return
        if tag == "a" and "ref" in classes and self._inside("tr", "limit"):
            sec.refs.append((int(attrs.get("data-ref", "0")), attrs.get("href", "")))
        if tag == "a" and "ref" in classes and self._inside("dl", "opfig"):
            sec.op_refs.append((int(attrs.get("data-ref", "0")), attrs.get("href", "")))
        if tag == "tr" and "op-row" in classes and self._inside("table", "oppoint"):
            sec.op_rows += 1
        if tag == "li" and self._inside("ol", "prov") and "id" in attrs:
            sec.prov_ids.add(attrs["id"])
        if tag == "svg" and attrs.get("role") == "img":
            sec.svgs += 1
        if tag == "title" and self._inside("svg", "chart"):
            sec.svg_titles += 1
        if tag == "desc" and self._inside("svg", "chart"):
            sec.svg_descs += 1
        if tag == "aside" and "caution-mains" in classes:
            sec.mains += 1
        if tag == "span" and "verdict" in classes:
            sec.verdicts.append(attrs.get("data-verdict", ""))
        if tag == "h2":
            self._heading = True

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        a = {k: v or "" for k, v in attrs}
        self._open(tag, a)
        if tag not in VOID:
            self.stack.append((tag, a))

    def handle_startendtag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self._open(tag, {k: v or "" for k, v in attrs})

    def handle_endtag(self, tag: str) -> None:
        if tag == "h2":
            self._heading = False
        while self.stack:
            t, _ = self.stack.pop()
            if t == tag:
                break
        if self._section_depth is not None and len(self.stack) <= self._section_depth:
            self._section_depth = None

    def handle_data(self, data: str) -> None:
        self.text.append(data)
        if self._heading and self._section_depth is not None and self.sections:
            self.sections[-1].heading += data


def parse_note(html: str) -> NoteParser:
    p = NoteParser()
    p.feed(html)
    p.close()
    return p


def check_note_html(html: str, result: ReviewResult) -> list[str]:
    """Return every structural problem of ``html`` as the note of ``result``."""
    p = parse_note(html)
    problems: list[str] = []
    dup = [i for i, n in Counter(p.ids).items() if n > 1]
    if dup:
        problems.append(f"duplicate ids: {sorted(dup)}")
    for tag in ("script", "iframe", "object", "embed", "link", "img"):
        if p.tags[tag]:
            problems.append(f"the note contains <{tag}>")
    external = [h for h in p.hrefs + p.srcs if not h.startswith("#")]
    if external:
        problems.append(f"links or resources outside the page: {external[:3]}")
    missing_targets = [h for h in p.hrefs if h.startswith("#") and h[1:] not in p.ids]
    if missing_targets:
        problems.append(f"links to missing anchors: {missing_targets[:5]}")

    by_heading = {s.heading.strip(): s for s in p.sections}
    if len(p.sections) != len(result.networks):
        problems.append(f"{len(p.sections)} network sections for {len(result.networks)} networks")
    for nr in result.networks:
        net = nr.network
        sec = by_heading.get(net.net)
        if sec is None:
            problems.append(f"no section for network {net.net!r}")
            continue
        if not sec.anchor or f"#{sec.anchor}" not in p.hrefs:
            problems.append(
                f"{net.net}: section anchor {sec.anchor!r} is not linked from the summary"
            )
        n_terms = sum(len(b.terms) for b in nr.bounds) + sum(len(c.terms) for c in nr.checks)
        if len(sec.refs) != n_terms:
            problems.append(f"{net.net}: {len(sec.refs)} term references for {n_terms} terms")
        for number, href in sec.refs:
            if href != f"#{sec.anchor}_p{number}" or href[1:] not in sec.prov_ids:
                problems.append(f"{net.net}: term reference {href!r} has no provenance entry")
        op = nr.operating
        rows = 0 if op is None else 1 + len(nr.recommendation.points if nr.recommendation else ())
        if sec.op_rows != rows:
            problems.append(f"{net.net}: {sec.op_rows} operating-point rows, expected {rows}")
        n_op = 0 if op is None else sum(len(f.terms) for f in op.figures)
        if len(sec.op_refs) != n_op:
            problems.append(f"{net.net}: {len(sec.op_refs)} operating-point references for {n_op}")
        for number, href in sec.op_refs:
            if href != f"#{sec.anchor}_p{number}" or href[1:] not in sec.prov_ids:
                problems.append(f"{net.net}: operating-point reference {href!r} has no entry")
        if sec.svgs != 1 or sec.svg_titles < 1 or sec.svg_descs < 1:
            problems.append(f"{net.net}: chart missing or without <title>/<desc>")
        want = 1 if net.mains_adjacent else 0
        if sec.mains != want:
            problems.append(f"{net.net}: {sec.mains} mains cautions, expected {want}")
        if not sec.verdicts or sec.verdicts[0] != nr.verdict.value:
            problems.append(
                f"{net.net}: verdict {sec.verdicts[:1]} shown, {nr.verdict.value} expected"
            )

    text = "".join(p.text)
    for label, path in result.files:
        try:
            with open(path, "rb") as f:
                digest = hashlib.sha256(f.read()).hexdigest()
        except OSError:
            continue
        if digest not in text:
            problems.append(f"SHA-256 of {label} ({digest}) is not in the note")
    if result.rules_file is None and "built-in defaults" not in text:
        problems.append("the note does not say the built-in rules were used")
    return problems
