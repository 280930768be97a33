"""The summary rows and recommendation paragraphs against the template lines they replaced.

The reference is jinja2 (a general-purpose template library, with markupsafe's escaping)
rendering the former template lines verbatim with the note's filters, on results with
hostile names and on every recommendation case.
"""

from __future__ import annotations

from dataclasses import replace

from pullproof.report import note_summary
from pullproof.report.note import AssumedRow, note_context, note_environment
from pullproof.results import ReviewResult
from resultfactory import hostile_result, sample_result

ENV = note_environment()

SUMMARY = """    <tbody>
    {% for nv in networks %}
      <tr><td><a href="#{{ nv.anchor }}">{{ nv.result.network.net }}</a>{% if nv.result.network.mains_adjacent %} <span class="tag">hazardous voltage</span>{% endif %}</td>
        <td>{{ nv.refs_text }}</td><td>{{ nv.value_text }}</td>
        <td>{{ nv.result.network.direction.value }} to {{ nv.result.network.rail.name }}</td>
        <td>{{ nv.result.window | window }}</td><td>{{ verdict(nv.result.verdict) }}{{ assumed(nv.result) }}{{ accepted(nv.result.accepted) }}</td></tr>
    {% endfor %}
    </tbody>"""  # noqa: E501

RECOMMENDATION = """  <h3>Recommendation</h3>
  {% set rec = nr.recommendation %}
  {% if rec is none %}
  <p class="muted">No recommendation: {{ "the window is not known on both sides" if nr.verdict.value == "incomplete" else "the window is not closed on both sides" }}.</p>
  {% elif rec.pick is none %}
  <p>No {{ rec.series }} value fits the window at ±{{ rec.tolerance | pct }}.</p>
  {% else %}
  <p><strong>{{ rec.series }} {{ rec.pick | ohms }}</strong> at ±{{ rec.tolerance | pct }} — {{ rec.reason }} (policy: {{ rec.policy }}).</p>
  <p class="cands">{{ rec.candidates | length }} {{ rec.series }} value{{ "" if rec.candidates | length == 1 else "s" }} whose whole band fits: {{ candidate_list(rec.candidates) }}.</p>
  {% endif %}

"""  # noqa: E501


def _results() -> list[ReviewResult]:
    return [sample_result(3), hostile_result()]


def test_summary_rows_match_the_template_loop() -> None:
    for result in _results():
        views = note_context(result, title="t", date="d")["networks"]
        for nets in (views, views[:1]):
            want = ENV.from_string(SUMMARY).render(networks=nets)
            html = note_summary.summary_rows(nets)
            got = ENV.from_string("    <tbody>\n    {{- html }}\n    </tbody>").render(html=html)
            assert got == want


def test_recommendation_matches_the_template_lines() -> None:
    placed = ENV.from_string("  <h3>Recommendation</h3>\n  {{ html }}\n\n")
    for result in _results():
        for nr in result.networks:
            rec = nr.recommendation
            variants = [nr, replace(nr, recommendation=None)]
            if rec is not None:
                variants += [
                    replace(nr, recommendation=replace(rec, pick=None)),
                    replace(nr, recommendation=replace(rec, candidates=rec.candidates[:1])),
                ]
            for v in variants:
                want = ENV.from_string(RECOMMENDATION).render(nr=v)
                assert placed.render(html=note_summary.recommendation(v)) == want


ASSUMED = """    <tbody>
    {% for a in assumptions %}
      <tr class="assumed-value"><td>{{ a.part or "—" }}</td><td>{{ a.pin or "—" }}</td><td>{{ a.quantity }}</td><td>{{ a.value }}</td><td>{{ a.basis }} <span class="status status-{{ a.status | replace(' ', '-') }}">{{ a.status }}</span></td><td class="small">{{ a.fix }}</td>
        <td class="small">{{ network_links(a.networks) }}</td></tr>
    {% endfor %}
    </tbody>"""  # noqa: E501


def test_assumed_value_rows_match_the_template_loop() -> None:
    hostile = "<b>&\"'x"  # every character markupsafe escapes (its documented set)
    # a greenhouse vent input whose leakage is the HC family figure (from memory)
    made = [
        AssumedRow(part, pin, hostile, "1\u00a0µA", hostile, hostile, "common practice", nets)
        for part, pin, nets in (("", "", ()), ("U1", "7 (GPIO5)", (("net-a", hostile),)))
    ]
    for result in _results():
        rows = note_context(result, title="t", date="d")["assumptions"] + made
        want = ENV.from_string(ASSUMED).render(assumptions=rows)
        html = note_summary.assumed_value_rows(rows)
        got = ENV.from_string("    <tbody>\n    {{- html }}\n    </tbody>").render(html=html)
        assert got == want


HEAD = """{% set nr = nv.result %}
{% set net = nr.network %}
<section class="network" id="{{ nv.anchor }}" aria-labelledby="{{ nv.anchor }}_h">
  <header>
    <div><div class="kicker">Pull-{{ net.direction.value }} network</div><h2 id="{{ nv.anchor }}_h">{{ net.net }}</h2></div>
    <div>{{ verdict(nr.verdict) }}{{ assumed(nr) }}</div>
  </header>
  <p class="reason"><strong>Verdict: {{ nr.verdict.value }}{{ " (assumed)" if nr.basis.value == "assumed" else "" }}.</strong> {{ nr.reason }}</p>
    <tbody><tr><td>{{ nr.window | window }}</td><td>{{ nr.band[0] | ohms }} … {{ nr.band[1] | ohms }}</td><td>{{ nr.margins[0] | margin("below") }}</td><td>{{ nr.margins[1] | margin("above") }}</td></tr></tbody>
"""  # noqa: E501


def test_network_head_and_numbers_row_match_the_template_lines() -> None:
    placed = ENV.from_string(
        "{{ network_head(nv) }}\n    <tbody>{{ numbers_row(nv.result) }}</tbody>\n"
    )
    for result in _results():
        for nv in note_context(result, title="t", date="d")["networks"]:
            assert placed.render(nv=nv) == ENV.from_string(HEAD).render(nv=nv)
