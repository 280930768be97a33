"""The note's inline tags against the template macros they replaced, rendered by jinja2.

The reference is jinja2 (a general-purpose template library, with markupsafe's escaping)
rendering the former macros of templates/_parts.html.j2 verbatim, with the note's settings.
"""

from __future__ import annotations

import jinja2
import pytest

from pullproof.report import note_tags
from pullproof.results import Acceptance, AcceptanceMark, Basis, Verdict

HOSTILE = "<b>&\"'x"  # every character markupsafe escapes (its documented set)

MACROS = """{% macro verdict(v) -%}
{%- set word = v.value if v.value is defined else v -%}
{%- set glyph = {"pass": "✓", "marginal": "!", "incomplete": "?", "fail": "✕"}[word] -%}
<span class="verdict v-{{ word }}" data-verdict="{{ word }}"><span class="glyph" aria-hidden="true">{{ glyph }}</span>{{ word }}</span>
{%- endmacro %}

{% macro assumed(result) -%}
{%- if result.basis.value == "assumed" %} <span class="tag assumed" data-basis="assumed" title="rests on {{ result.assumptions | length }} assumed value{{ '' if result.assumptions | length == 1 else 's' }}">assumed</span>{% endif -%}
{%- endmacro %}

{% macro accepted(mark) -%}
{%- if mark is not none -%}
{%- if mark.holds -%}
 <span class="tag accepted" data-accepted="yes" title="{{ mark.acceptance.reason }}">accepted</span>
{%- else -%}
 <span class="tag lapsed" data-accepted="lapsed" title="{{ mark.lapsed }}">acceptance lapsed</span>
{%- endif -%}
{%- endif -%}
{%- endmacro %}

"""  # noqa: E501
ENV = jinja2.Environment(
    loader=jinja2.DictLoader({"_parts.html.j2": MACROS}),
    autoescape=True,
    trim_blocks=True,
    lstrip_blocks=True,
)


def _macro(call: str, **values: object) -> str:
    head = '{% from "_parts.html.j2" import verdict, assumed, accepted %}'
    return ENV.from_string(head + "{{ " + call + " }}").render(**values)


@pytest.mark.parametrize("v", [*Verdict, "pass", "marginal", "incomplete", "fail"])
def test_verdict_matches_the_macro(v: object) -> None:
    assert note_tags.verdict(v) == _macro("verdict(v)", v=v)


class _Result:
    """The two fields the "assumed" tag reads."""

    def __init__(self, basis: Basis, n: int) -> None:
        self.basis, self.assumptions = basis, tuple(range(n))


@pytest.mark.parametrize("basis", list(Basis))
@pytest.mark.parametrize("n", [0, 1, 5])
def test_assumed_matches_the_macro(basis: Basis, n: int) -> None:
    result = _Result(basis, n)
    assert note_tags.assumed(result) == _macro("assumed(r)", r=result)  # type: ignore[arg-type]


def test_accepted_matches_the_macro() -> None:
    assert note_tags.accepted(None) == _macro("accepted(m)", m=None)
    for acceptance in _acceptances():
        for lapsed in ("", HOSTILE):
            mark = AcceptanceMark(acceptance, lapsed)
            assert note_tags.accepted(mark) == _macro("accepted(m)", m=mark)


def _acceptances() -> list[Acceptance]:
    # a workshop-panel pull-up accepted as marginal, with a reason that needs escaping
    return [
        Acceptance("rules", "pullproof.toml:12", "R17", "", "marginal", 1e5, 0.05, reason)
        for reason in ("strapped at power-up only", HOSTILE)
    ]
