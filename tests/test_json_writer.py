"""The JSON writer against the standard library's ``json`` module, its reference.

Every document the writer produces must be the text ``json.dumps(doc, indent=1,
ensure_ascii=False)`` produces, byte for byte: the review, nets, families and SARIF
documents are compared in other tests and by users' scripts as text.
"""

from __future__ import annotations

import json
from typing import Any

import pytest
from hypothesis import given
from hypothesis import strategies as st

from pullproof.report.json_writer import Streamed, write_json
from pullproof.report.safe_text import json_text

_leaf = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(),
    st.floats(),  # NaN and ±inf too: json writes NaN, Infinity, -Infinity
    st.text(),
)
_keys = st.one_of(st.text(), st.integers(), st.floats(allow_nan=False), st.booleans(), st.none())
_docs = st.recursive(
    _leaf,
    lambda kids: st.one_of(
        st.lists(kids, max_size=5),
        st.tuples(kids, kids),
        st.dictionaries(_keys, kids, max_size=5),
    ),
    max_leaves=40,
)


def _written(doc: Any, indent: int = 1) -> str:
    pieces: list[str] = []
    write_json(doc, pieces.append, indent)
    return "".join(pieces)


@given(_docs)
def test_random_documents_match_json_dumps(doc: Any) -> None:
    assert _written(doc) == json.dumps(doc, indent=1, ensure_ascii=False)


@given(_docs, st.integers(0, 4))
def test_any_indent_matches_json_dumps(doc: Any, indent: int) -> None:
    assert _written(doc, indent) == json.dumps(doc, indent=indent, ensure_ascii=False)


def test_large_lists_are_handed_on_in_pieces() -> None:
    doc = {"networks": [{"ref": f"R{i}", "ohms": 10_000.0 + i} for i in range(20_000)]}
    pieces: list[str] = []
    write_json(doc, pieces.append)
    assert len(pieces) > 1
    assert "".join(pieces) == json.dumps(doc, indent=1, ensure_ascii=False)


def test_unsafe_characters_are_still_escaped() -> None:
    doc = {"value": "10k\x1b[31m\u202e", "unit": "Ω", "far": "\U0001f600"}
    text = json_text(doc)
    assert "\x1b" not in text and "\u202e" not in text and "Ω" in text
    assert json.loads(text) == doc


def test_what_json_refuses_is_refused() -> None:
    with pytest.raises(TypeError):
        _written({"a": object()})
    with pytest.raises(TypeError):
        _written({(1, 2): 3})


def test_a_streamed_array_is_written_as_the_list_it_stands_for() -> None:
    made: list[int] = []

    def items() -> list[dict[str, int]]:
        made.append(1)
        return [{"i": i} for i in range(3)]

    doc = {"networks": Streamed(items, 3), "none": Streamed(list, 0)}
    assert _written(doc) == json.dumps(
        {"networks": [{"i": 0}, {"i": 1}, {"i": 2}], "none": []}, indent=1, ensure_ascii=False
    )
    assert made == [1]
