"""The note's Python-built fragments against the same loops rendered by jinja2's autoescape.

The reference is jinja2 itself (a general-purpose template library, with markupsafe's
escaping): each fragment must be byte for byte what the template loop it replaced wrote,
including for names with every character HTML escapes.
"""

from __future__ import annotations

import jinja2
from markupsafe import Markup

from pullproof.report import note_html
from pullproof.report.format import format_ohms, format_value
from pullproof.report.note import ProvEntry, TermRef
from pullproof.results import PointValues

ENV = jinja2.Environment(autoescape=True, trim_blocks=True, lstrip_blocks=True)
ENV.filters.update(ohms=format_ohms, rkm=note_html.format_rkm)
HOSTILE = "<b>&\"'x"  # every character markupsafe escapes (its documented set)

TERMS = (TermRef("V_min", "4.75\u00a0V", 1), TermRef(HOSTILE, HOSTILE, 12))


def test_terms_match_the_template_loop() -> None:
    # the loop of the "terms" macro templates/_parts.html.j2 had
    loop = ENV.from_string(
        '{%- for t in values %}{{ t.symbol }} = {{ t.value }}<a class="ref" '
        'href="#{{ anchor }}_p{{ t.ref }}" data-ref="{{ t.ref }}">[{{ t.ref }}]</a>'
        '{{ "" if loop.last else " · " }}{% endfor -%}'
    )
    for values in (TERMS, TERMS[:1], ()):
        assert note_html.terms(values, "net-a") == loop.render(values=values, anchor="net-a")


def test_term_items_match_the_template_loop() -> None:
    loop = ENV.from_string(
        '{% for t in row %}<li>{{ t.symbol }} = {{ t.value }}<a class="ref" '
        'href="#{{ a }}_p{{ t.ref }}" data-ref="{{ t.ref }}">[{{ t.ref }}]</a></li>{% endfor %}'
    )
    assert note_html.term_items(TERMS, "net-b") == loop.render(row=TERMS, a="net-b")


def test_candidates_match_the_template_loop() -> None:
    loop = ENV.from_string(
        "{% for c in cs %}{{ c | ohms }} (<code>{{ c | rkm }}</code>)"
        '{{ "" if loop.last else ", " }}{% endfor %}'
    )
    # E24 values of one decade and its neighbours (IEC 60063)
    for cs in ((620.0, 680.0, 1000.0, 4700.0, 2.2e6), (10.0,), ()):
        assert note_html.candidates(cs) == loop.render(cs=cs)


def test_provenance_matches_the_template_loop() -> None:
    entries = (
        ProvEntry(1, "V_min", "4.75\u00a0V", "+5V ± 5 %", "rules", "default", ""),
        ProvEntry(2, HOSTILE, HOSTILE, HOSTILE, "part", "common practice", HOSTILE),
    )
    loop = ENV.from_string(
        '<ol>\n{% for p in ps %}\n    <li id="{{ a }}_p{{ p.number }}" value="{{ p.number }}">'
        "<strong>{{ p.symbol }}</strong> = {{ p.value }} — {{ p.where }} "
        "<span class=\"status status-{{ p.status | replace(' ', '-') }}\">{{ p.status }}</span>"
        '{% if p.reason %} <span class="muted">{{ p.reason }}</span>{% endif %}</li>\n'
        "{% endfor %}\n  </ol>"
    )
    placed = ENV.from_string("<ol>\n  {{- html }}\n  </ol>")
    for ps in (entries, ()):
        got = placed.render(html=note_html.provenance(ps, "net-c"))
        assert got == loop.render(ps=ps, a="net-c")


LOOP = ENV.from_string(
    "<tbody>\n{% for row in rows %}\n"
    "      <tr class=\"op-row{{ ' fitted' if row.fitted else '' }}"
    "{{ ' pick' if row.pick else '' }}\"><td>{% if row.pick %}"
    '<span aria-hidden="true">▲ </span>{% endif %}{{ row.ohms | ohms }} '
    "<code>{{ row.ohms | rkm }}</code>{% if row.label %}"
    '<div class="small muted">{{ row.label }}</div>{% endif %}</td>'
    '<td class="small">{{ row.band[0] | ohms }} … {{ row.band[1] | ohms }}</td>'
    '{% for c in row.cells %}<td class="num">{{ c }}</td>{% endfor %}</tr>\n'
    "{% endfor %}\n    </tbody>"
)
PLACED = ENV.from_string("<tbody>\n    {{- html }}\n    </tbody>")


def test_point_row_matches_the_template_loop() -> None:
    # 4.7 kΩ ±1 %: its band, Ohm's law at 5.25 V; the idle level is a bare volt figure
    figures = (5.25 / 4653.0, 4.75 / 4747.0, 5.25**2 / 4653.0, 4.74, None)
    units = ("A", "A", "W", "V", "s")
    raw = ["—" if x is None else format_value(x, u) for x, u in zip(figures, units, strict=True)]
    cells = "".join(map(note_html.cell, figures, units))
    rows = [
        dict(label=HOSTILE, ohms=4700.0, band=(4653.0, 4747.0), fitted=True, pick=False),
        dict(label="E24 pick", ohms=6800.0, band=(6732.0, 6868.0), fitted=False, pick=True),
        dict(label="", ohms=1.0e6, band=(9.9e5, 1.01e6), fitted=False, pick=False),
    ]
    html = "".join(
        note_html.point_row(
            r["label"], r["ohms"], r["band"], cells, fitted=r["fitted"], pick=r["pick"]
        )
        for r in rows
    )
    for r in rows:
        r["cells"] = raw  # the template escaped the plain texts itself
    assert PLACED.render(html=Markup(html)) == LOOP.render(rows=rows)


def test_candidate_rows_match_the_template_loop() -> None:
    # E24 values around 6.8 kΩ (IEC 60063) at ±1 %, Ohm's law at 5.25 V; one unknown figure
    points = [
        PointValues(r, (r * 0.99, r * 1.01), 5.25 / r, 4.75 / r, None, 4.74, 1e-7)
        for r in (5600.0, 6200.0, 6800.0, 7500.0)
    ]
    for pick in (6800.0, None, 1.0):
        html = note_html.candidate_rows(points, pick, "E24")
        rows = [
            dict(
                label="E24 pick" if p.ohms == pick else "", ohms=p.ohms, band=p.band,
                cells=["—" if x is None else format_value(x, u)
                       for x, u in zip(p.figures, PointValues.UNITS, strict=True)],
                fitted=False, pick=p.ohms == pick,
            )
            for p in points
        ]  # fmt: skip
        assert PLACED.render(html=Markup(html)) == LOOP.render(rows=rows)
