"""Terminal safety: control characters and bidi marks from a schematic reach the console and
JSON only as escapes.

The characters are those the Unicode standard gives the general categories Cc (controls:
C0, DEL, C1 including CSI U+009B), Cf (format: the bidirectional marks, embeddings,
overrides and isolates of Unicode Standard Annex #9, zero-width characters), Zl and Zp
(line and paragraph separators); the categories are read from Python's ``unicodedata``.
"""

from __future__ import annotations

import json
import unicodedata
from pathlib import Path

import pytest

from builder import SWITCH_PINS, SchematicBuilder
from hostile import raw_controls, run
from pullproof.report.safe_text import for_terminal, json_text

# ESC [ 2 J clears a terminal; BEL rings; CR and BS rewrite what was shown; CSI (U+009B)
# starts a control sequence in one byte; U+202E (RIGHT-TO-LEFT OVERRIDE) and U+2066
# (LEFT-TO-RIGHT ISOLATE) reorder text (Unicode Standard Annex #9); U+2028 breaks a line.
NASTY = "\x1b[2J\x07\r\x08\x9b31m\u202e\u2066\u2028"


@pytest.mark.parametrize(
    ("text", "shown"),
    [
        ("\x1b[31mRED", "\\x1b[31mRED"),
        ("bell\x07", "bell\\x07"),
        ("over\rwrite\x08", "over\\x0dwrite\\x08"),
        ("\x9b2J", "\\x9b2J"),
        ("abc\u202edef", "abc\\u202edef"),
        ("iso\u2066late\u2069", "iso\\u2066late\\u2069"),
        ("tag\U000e0041", "tag\\U000e0041"),  # a tag character (Cf), above the BMP
        ("4k7 Ω ±1 % µA °C", "4k7 Ω ±1 % µA °C"),  # printable text is left as it is
        ("two\nlines", "two\nlines"),  # a report's own newlines are kept …
    ],
)
def test_for_terminal_escapes_what_could_drive_a_terminal(text: str, shown: str) -> None:
    assert for_terminal(text) == shown


def test_an_error_line_escapes_newlines_too() -> None:
    assert for_terminal("a\nb\tc", keep="") == "a\\x0ab\\x09c"


def test_json_text_escapes_c1_and_bidi_and_keeps_every_value() -> None:
    doc = {"name": NASTY, "tag": "x\U000e0041", "plain": "47 kΩ", "n": [1, 2.5, None]}
    text = json_text(doc)
    assert raw_controls(text) == []  # only the layout's newlines are raw
    assert "\\u202e" in text and "\\u009b" in text and "\\udb40\\udc41" in text
    assert json.loads(text) == doc


def test_every_unsafe_category_is_escaped() -> None:
    """Every character of the unsafe categories below U+3000 (plus the BMP's last block)."""
    unsafe = [
        chr(cp)
        for cp in (*range(0x3000), *range(0xFE00, 0x10000))
        if unicodedata.category(chr(cp)) in {"Cc", "Cf", "Zl", "Zp"} and chr(cp) != "\n"
    ]
    assert raw_controls(for_terminal("".join(unsafe))) == []


@pytest.fixture
def nasty_board(tmp_path: Path) -> Path:
    """A pull-up whose net label, a resistor field and the switch's Value carry control
    characters."""
    b = SchematicBuilder()
    b.resistor(
        "R1", "10k", at=(50.8, 50.8),
        fields={"Tolerance": "1%", "Note": NASTY, "pullproof.role": "pull"},
    )  # fmt: skip
    b.power("+5V", at=b.pin_point("R1", "1"))
    b.part("SW1", "Switch:SW_Push", pins=SWITCH_PINS, at=(50.8, 76.2), value=f"SW{NASTY}")
    b.power("GND", at=b.pin_point("SW1", "2"))
    b.wire(b.pin_point("R1", "2"), b.pin_point("SW1", "1"))
    b.label(f"KEY{NASTY}", at=b.pin_point("R1", "2"))
    return b.write(tmp_path / "panel.kicad_sch")


@pytest.mark.parametrize(
    "argv",
    [["nets"], ["nets", "--json"], ["review"], ["review", "--json"], ["annotate"]],
    ids=["nets", "nets-json", "review", "review-json", "annotate"],
)
def test_console_output_shows_schematic_controls_only_as_escapes(
    nasty_board: Path, argv: list[str]
) -> None:
    code, out, err = run(argv[0], str(nasty_board), *argv[1:])
    assert code in (0, 1), err
    assert raw_controls(out + err) == []
    assert "KEY" in out
    if "--json" in argv:  # the JSON still holds the exact text, as escapes
        assert any(NASTY in text for text in _strings(json.loads(out)))
    elif argv[0] == "annotate":  # a field value is one line: its whitespace is spaces
        assert "KEY\\x1b[2J\\x07 \\x08\\x9b31m\\u202e\\u2066 is unknown" in out
    else:
        assert "KEY\\x1b[2J\\x07\\x0d\\x08\\x9b31m\\u202e\\u2066\\u2028" in out


def _strings(doc: object) -> list[str]:
    if isinstance(doc, str):
        return [doc]
    if isinstance(doc, dict):
        return [s for k, v in doc.items() for s in (*_strings(k), *_strings(v))]
    if isinstance(doc, list):
        return [s for v in doc for s in _strings(v)]
    return []


def test_an_error_quoting_schematic_text_shows_it_escaped(nasty_board: Path) -> None:
    text = nasty_board.read_text(encoding="utf-8")
    nasty_board.write_text(text.replace('"Tolerance" "1%"', f'"Tolerance" "{NASTY}"'), "utf-8")
    code, out, err = run("review", str(nasty_board))
    assert (code, out) == (2, "")
    assert raw_controls(err) == [] and err.count("\n") == 1
    assert (
        "field 'Tolerance' of R1: cannot read '\\x1b[2J\\x07\\r\\x08\\x9b31m\\u202e\\u2066\\u2028'"
        in err
    )


def test_a_file_name_with_controls_is_escaped_in_the_error(tmp_path: Path) -> None:
    code, out, err = run("nets", str(tmp_path / "evil\x1b]0;title\x07.kicad_sch"))
    assert (code, out) == (2, "")
    assert err == (
        f"pullproof: cannot read {tmp_path}/evil\\x1b]0;title\\x07.kicad_sch: "
        "No such file or directory\n"
    )


def test_the_json_prefilter_lets_every_unsafe_character_through() -> None:
    # The prefilter decides which characters reach the category test; it must hold every
    # code point of the unsafe categories per the running Python's Unicode tables (the
    # Unicode Character Database, a general-purpose reference), in every plane.
    import sys

    from pullproof.report.safe_text import _MAYBE_UNSAFE_JSON, UNSAFE_CATEGORIES

    missed = [
        hex(cp)
        for cp in range(sys.maxunicode + 1)
        if cp != 0x0A
        and unicodedata.category(chr(cp)) in UNSAFE_CATEGORIES
        and not _MAYBE_UNSAFE_JSON.match(chr(cp))
    ]
    assert missed == []
    for ch in "Ωµ±°–×≤≥é":  # common in reviews: never sent to the callback
        assert not _MAYBE_UNSAFE_JSON.match(ch)
