"""The S-expression layer: values, spans, and one-line positioned errors."""

from __future__ import annotations

import math

import pytest
import sexpdata
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from conftest import FIXTURES, REALWORLD
from pullproof.errors import SchematicSyntaxError
from pullproof.sexpr import MAX_DEPTH, Node, Sym, parse


def test_values_and_spans() -> None:
    text = '(a (b 1 -2.5) "s \\"q\\"" (c (d yes)))'
    node = parse(text, "t.kicad_sch")
    assert node.head == "a" and node.span == (0, len(text))
    b = node.first("b")
    assert b is not None and b.items == (1, -2.5) and text[b.span[0] : b.span[1]] == "(b 1 -2.5)"
    assert node.atoms() == ('s "q"',)
    d = node.first("c").first("d")  # type: ignore[union-attr]
    assert d is not None and type(d.items[0]) is Sym and d.items[0] == "yes"
    assert text[d.span[0] : d.span[1]] == "(d yes)"


@pytest.mark.parametrize(
    ("text", "flag", "expected"),
    [
        ("(pin input line hide (at 0 0 0))", "hide", True),  # v6-v8 bare word
        ("(pin input line (at 0 0 0) (hide yes))", "hide", True),  # v9+ list
        ("(pin input line (hide no))", "hide", False),
        ("(symbol (power))", "power", True),
        ("(symbol (power global))", "power", True),
        ("(symbol (in_bom yes))", "power", False),
    ],
)
def test_flags(text: str, flag: str, expected: bool) -> None:
    assert parse(text, "t").has_flag(flag) is expected


def test_tabs_and_crlf_are_whitespace() -> None:
    node = parse("(kicad_sch\r\n\t(version 20260306)\r\n)", "t")
    assert isinstance(node, Node) and node.first("version").atom() == 20260306  # type: ignore[union-attr]


@pytest.mark.parametrize(
    ("text", "where", "message"),
    [
        ("", "1:1", "empty file: expected a '(' list"),
        ("  \n\t\n", "1:1", "empty file: expected a '(' list"),
        (
            "(kicad_sch\n  (version 1)",
            "1:1",
            "unclosed '(': missing ')' before the end of the file",
        ),
        ("(a\n  (b (c 1)", "2:3", "unclosed '(': missing ')' before the end of the file"),
        (")", "1:1", "unexpected ')' with no open '('"),
        ("(a)\n)", "2:1", "unexpected text after the end of the top-level list"),
        ("(a)\n(b)", "2:1", "unexpected text after the end of the top-level list"),
        ('(a\n  (b "open)\n)', "2:6", "unterminated string: missing closing '\"'"),
        ("(a\n (at nan 0 0))", "2:6", "number 'nan' is not finite"),
        ("(a (at 1e999 0))", "1:8", "number '1e999' is not finite"),
        ("(a (at 0 -inf))", "1:10", "number '-inf' is not finite"),
        ("kicad_sch", "1:1", "expected '(' but found 'kicad_sch'"),
        ("(a [b])", "1:4", "unexpected character in bare word '[b]'; quote it"),
        ("(a 'b)", "1:4", 'unexpected character in bare word "\'b"; quote it'),
        # found by the fuzz suite: a bare backslash before a quote (sexpdata reads it as an
        # escaped quote inside a word, the scanner as the start of a string)
        ('(a \\"  (b) "x")', "1:4", "unexpected character in bare word '\\\\'; quote it"),
        (
            "(" * (MAX_DEPTH + 1) + ")" * (MAX_DEPTH + 1),
            f"1:{MAX_DEPTH + 1}",
            f"lists nested deeper than {MAX_DEPTH} levels",
        ),
    ],
)
def test_malformed_text(text: str, where: str, message: str) -> None:
    with pytest.raises(SchematicSyntaxError) as info:
        parse(text, "bad.kicad_sch")
    assert str(info.value) == f"bad.kicad_sch:{where}: {message}"


def test_deep_but_legal_nesting_parses() -> None:
    text = "(" * MAX_DEPTH + ")" * MAX_DEPTH
    assert parse(text, "t").span == (0, len(text))


# --- agreement with sexpdata, the general-purpose S-expression reader --------------------------


def _loads(text: str) -> object:
    return sexpdata.loads(text, nil=None, true=None, false=None, line_comment="\x00")


def _same(ours: Node | object, theirs: object) -> bool:
    """Our tree equals sexpdata's: lists, Symbols as Sym, str, int, float, in order. A head
    is kept as text (quoted or bare alike), as the schematic model reads it."""
    if not isinstance(ours, Node):
        if type(ours) is Sym:
            return type(theirs) is sexpdata.Symbol and str(theirs) == ours
        return type(ours) is type(theirs) and ours == theirs
    if not isinstance(theirs, list):
        return False
    if ours.head:
        if not theirs or not isinstance(theirs[0], str) or str(theirs[0]) != ours.head:
            return False
        theirs = theirs[1:]
    return len(ours.items) == len(theirs) and all(
        _same(a, b) for a, b in zip(ours.items, theirs, strict=True)
    )


_SCHEMATICS = sorted(FIXTURES.rglob("*.kicad_sch")) + sorted(REALWORLD.rglob("*.kicad_sch"))


@pytest.mark.parametrize("path", _SCHEMATICS, ids=lambda p: p.name)
def test_every_schematic_reads_as_sexpdata_reads_it(path: object) -> None:
    # The one-pass reader must give sexpdata's values and structure on every real file
    # (fixtures and, when ../shared is present, the public designs); spans are checked by
    # re-reading each list's own text.
    text = path.read_text(encoding="utf-8")  # type: ignore[attr-defined]
    node = parse(text, "t")
    assert _same(node, _loads(text))
    first = next(node.nodes(), None)
    if first is not None:
        again = parse(text[first.span[0] : first.span[1]], "t")
        assert again == Node(first.head, again.items, again.span) and again.items == first.items


def _finite_or_word(w: str) -> bool:
    try:
        return math.isfinite(float(w))  # inf and nan are refused on purpose (tested above)
    except ValueError:
        return True


_word = st.text(
    alphabet=st.characters(blacklist_characters="()\"\\[]'`\x00 \t\n\r\x0b\x0c"), min_size=1
).filter(_finite_or_word)
_string = st.text().map(lambda s: '"' + s.replace("\\", "\\\\").replace('"', '\\"') + '"')
_escaped = st.sampled_from(['"a\\nb"', '"\\t\\r\\b\\f"', '"\\q"', '"x\\\\y"', '"\\"in\\""'])


@st.composite
def _documents(draw: st.DrawFn, depth: int = 0) -> str:
    n = draw(st.integers(0, 4))
    parts = [draw(st.one_of(_word, _string, _escaped, st.integers().map(str),
                            st.floats(allow_nan=False, allow_infinity=False).map(repr)))
             for _ in range(n)]  # fmt: skip
    if depth < 3:
        parts += [draw(_documents(depth + 1)) for _ in range(draw(st.integers(0, 2)))]
    sep = draw(st.sampled_from([" ", "\n", "\t ", "  \r\n"]))
    return "(" + sep.join(parts) + ")"


@settings(max_examples=300, suppress_health_check=[HealthCheck.too_slow])  # first draw builds
@given(_documents())  # the character table
def test_random_documents_read_as_sexpdata_reads_them(text: str) -> None:
    assert _same(parse(text, "t"), _loads(text))


def test_an_integer_beyond_float_range_is_refused() -> None:
    # found by the fuzz suite: int() reads 400 digits, but no coordinate or value can use it
    with pytest.raises(SchematicSyntaxError, match=r"1:8: number '9+'… is not finite"):
        parse("(a (at " + "9" * 400 + " 0))", "bad.kicad_sch")
