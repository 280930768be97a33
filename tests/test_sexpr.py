"""The S-expression layer: values, spans, and one-line positioned errors."""

from __future__ import annotations

import pytest

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
