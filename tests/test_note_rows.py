"""The note's Python-built tables against the template lines they replaced, rendered by jinja2.

The reference is jinja2 (a general-purpose template library, with markupsafe's escaping)
rendering the former template lines verbatim, with the note's settings; each fragment
must match byte for byte, for rows with and without every optional part and for texts
with every character HTML escapes.
"""

from __future__ import annotations

import itertools

import jinja2
from markupsafe import Markup

from pullproof.network import Missing
from pullproof.provenance import Origin, Provenance, Sourced, Status
from pullproof.quantity import Qty
from pullproof.report import note_html, note_rows
from pullproof.report.format import format_sourced
from pullproof.report.note import CircuitRow, FigureView, LimitRow, TermRef
from pullproof.results import Assumption

ENV = jinja2.Environment(autoescape=True, trim_blocks=True, lstrip_blocks=True)
ENV.filters.update(qty=format_sourced)
ENV.globals.update(term_items=note_html.term_items, term_list=note_html.terms)
HOSTILE = "<b>&\"'x"  # every character markupsafe escapes (its documented set)
TERMS = (TermRef("V_min", "4.75\u00a0V", 1), TermRef(HOSTILE, HOSTILE, 2))
MISSING = (Missing("V_IH,min of U2 pin 3", "U2", HOSTILE), Missing(HOSTILE, "", "add it"))

MISSING_MACRO = """{% macro missing_list(items) -%}
<ul>
{% for m in items %}
  <li><strong>{{ m.what }}</strong>{% if m.ref %} (part {{ m.ref }}){% endif %}: {{ m.hint }}</li>
{% endfor %}
</ul>
{%- endmacro %}
"""

LIMITS = """    <tbody>
    {% for row in nv.rows %}
      <tr class="limit{{ ' assumed' if row.assumed else '' }}" data-constraint="{{ row.constraint }}"{% if row.assumed %} data-assumed="yes"{% endif %}>
        <td><strong>{{ row.title }}</strong><br>
          <span class="tag{{ '' if row.hard else ' soft' }}">{{ "hard" if row.hard else "soft" }}</span>{% if row.assumed %}<span class="tag assumed">assumed</span>{% endif %}{% if row.binding %}<span class="tag binding">binding</span>{% endif %}
          {% if row.assumed %}<div class="small">rests on {{ row.assumed | join(", ") }}</div>{% endif %}
          {% if row.corner %}<div class="small muted">worst at {{ row.corner }}</div>{% endif %}</td>
        <td><div class="formula">{{ row.formula }}</div><div class="formula muted">= {{ row.substituted }}</div>
          {% if row.explanation %}<div class="small muted">{{ row.explanation }}</div>{% endif %}</td>
        <td><ul class="terms">{{ term_items(row.terms, nv.anchor) }}</ul></td>
        <td>{{ row.limit }}<br>{% if row.met is none %}<span class="mark unknown">unknown</span>{% elif row.met %}<span class="mark met">met</span>{% else %}<span class="mark unmet">not met</span>{% endif %}<div class="small muted">{{ row.outcome }}</div></td>
      </tr>
    {% endfor %}
    </tbody>"""  # noqa: E501

FIGURES = (
    MISSING_MACRO
    + """  <dl class="opfig small">
    {% for c in op.columns %}
    <dt>{{ c.title }}</dt>
    <dd><span class="formula">{{ c.formula }}</span>{% if c.substituted %} <span class="formula muted">= {{ c.substituted }} = {{ c.value }}</span>{% endif %}{% if c.terms %}<br><span class="vals">{{ term_list(c.terms, nv.anchor) }}</span>{% endif %}{% if c.note %}<br>{{ c.note }}{% endif %}{% if c.missing %}{{ missing_list(c.missing) }}{% endif %}</dd>
    {% endfor %}
  </dl>"""  # noqa: E501
)


def _placed(body: str, html: Markup) -> str:
    """A fragment where the template now places it with ``{{- … }}``."""
    return ENV.from_string(body).render(html=html)


def _limit_rows() -> list[LimitRow]:
    rows = []
    # every combination of the optional parts, with a met, unmet and unknown result
    for assumed, binding, corner, why, met in itertools.product(
        ((), ("assumed rating", HOSTILE)), (False, True), ("", HOSTILE), ("", HOSTILE),
        (None, True, False),
    ):  # fmt: skip
        rows.append(
            LimitRow(
                HOSTILE, "resistor-power", "R_lo ≥ V² / P", HOSTILE, TERMS, "R_lo ≥ 551\u00a0Ω",
                binding, met, HOSTILE, binding, "Joule heating", why, corner, (), assumed,
            )
        )  # fmt: skip
    return rows


def test_limit_rows_match_the_template_loop() -> None:
    for rows in (_limit_rows(), []):
        want = ENV.from_string(LIMITS).render(nv={"rows": rows, "anchor": "net-a"})
        html = note_rows.limit_rows(rows, "net-a")
        assert _placed("    <tbody>\n    {{- html }}\n    </tbody>", html) == want


def test_figure_list_matches_the_template_loop() -> None:
    columns = [
        FigureView(HOSTILE, "I_max = V_max / R_lo", sub, HOSTILE, terms, note, missing)
        for sub, terms, note, missing in itertools.product(
            ("", HOSTILE), ((), TERMS), ("", HOSTILE), ((), MISSING)
        )
    ]
    for cols in (columns, []):
        want = ENV.from_string(FIGURES).render(op={"columns": cols}, nv={"anchor": "net-b"})
        html = note_rows.figure_list(cols, "net-b")
        assert _placed('  <dl class="opfig small">\n  {{- html }}\n  </dl>', html) == want


def test_missing_list_matches_the_macro() -> None:
    macro = ENV.from_string(MISSING_MACRO + "{{ missing_list(items) }}")
    for items in (MISSING, MISSING[:1], ()):
        assert note_rows.missing_list(items) == macro.render(items=items)


def test_assumption_items_match_the_template_loop() -> None:
    loop = ENV.from_string(
        "{% for a in items %}<li>{% if a.part %}{{ a.part }}{% if a.pin %} pin {{ a.pin }}"
        "{% endif %}: {% endif %}{{ a.quantity }} = {{ a.text or (a.value | qty) }} "
        "({{ a.basis }}); the real value goes in {{ a.fix }}</li>{% endfor %}"
    )
    # 10 µA input leakage: the JESD7A limit for HC inputs (from memory)
    value = Sourced(Qty(10e-6, "A"), Provenance(Origin.DEFAULT, HOSTILE, Status.DEFAULT))
    items = [
        Assumption(part, pin, HOSTILE, value, text, HOSTILE, HOSTILE)
        for part, pin, text in itertools.product(("", "U1"), ("", "7 (GPIO5)"), ("", "10uA"))
    ]
    assert note_rows.assumption_items(items) == loop.render(items=items)


def test_network_links_match_the_template_loop() -> None:
    loop = ENV.from_string(
        '{% for anchor, net in nets %}<a href="#{{ anchor }}">{{ net }}</a>'
        '{{ "" if loop.last else ", " }}{% endfor %}'
    )
    for nets in ([("net-a", HOSTILE), ("net-b", "/vents/VENT_LIMIT")], [("net-c", "X")], []):
        assert note_rows.network_links(nets) == loop.render(nets=nets)


def test_circuit_list_matches_the_template_loop() -> None:
    loop = ENV.from_string(
        '  <dl class="circuit">\n    {% for row in nv.circuit %}\n'
        "    <dt>{{ row.label }}</dt>\n"
        '    <dd>{{ row.text }}{% if row.values %}<br><span class="vals">'
        "{{ term_list(row.values, nv.anchor) }}</span>{% endif %}</dd>\n"
        "    {% endfor %}\n  </dl>"
    )
    rows = [CircuitRow("Net", HOSTILE, ()), CircuitRow(HOSTILE, "R1, size 0603", TERMS)]
    for circuit in (rows, []):
        want = loop.render(nv={"circuit": circuit, "anchor": "net-d"})
        html = note_rows.circuit_list(circuit, "net-d")
        assert _placed('  <dl class="circuit">\n  {{- html }}\n  </dl>', html) == want
