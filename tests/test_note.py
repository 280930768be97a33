"""The HTML design note: structure, provenance links, digests, escaping, cautions, writing."""

from __future__ import annotations

import hashlib
import re
import shutil
from collections.abc import Iterator
from dataclasses import replace
from pathlib import Path

import jinja2
import pytest

from notecheck import check_note_html, parse_note
from pullproof import __version__
from pullproof.errors import PullproofError
from pullproof.report import note as note_mod
from pullproof.report.format import format_ohms, format_quantity, format_window
from pullproof.report.note import (
    note_context,
    note_environment,
    render_note,
    stream_note,
    write_note,
)
from pullproof.results import ReviewResult
from pullproof.textfile import write_report
from pullproof.units import Q_
from resultfactory import HOSTILE, HOSTILE_VALUE, hostile_result, sample_result

REPO = Path(__file__).resolve().parents[1]


def render(result: ReviewResult, **kw: str) -> str:
    return render_note(
        result, title="Greenhouse controller", author="Tester", date="2025-03-01", **kw
    )


@pytest.fixture
def design(tmp_path: Path) -> tuple[ReviewResult, dict[str, str]]:
    """The sample review with real files behind its file list and rules file."""
    texts = {
        "greenhouse.kicad_sch": "(kicad_sch (version 20231120))\n",
        "vents.kicad_sch": "(kicad_sch (version 20231120) (uuid x))\n",
        "abc.kicad_sch": "abc",
    }
    files = []
    for name, text in texts.items():
        (tmp_path / name).write_text(text, encoding="utf-8")
        files.append((name, str(tmp_path / name)))
    rules = tmp_path / "greenhouse.toml"
    rules.write_text("[margin]\nvolts = 0.1\n", encoding="utf-8")
    digests = {n: hashlib.sha256(t.encode()).hexdigest() for n, t in texts.items()}
    digests["greenhouse.toml"] = hashlib.sha256(rules.read_bytes()).hexdigest()
    return sample_result(files=tuple(files), rules_file=str(rules)), digests


def test_sample_note_is_sound(design: tuple[ReviewResult, dict[str, str]]) -> None:
    result, _ = design
    assert check_note_html(render(result), result) == []


def test_every_network_count_renders_soundly() -> None:
    for n in range(0, 6):
        result = sample_result(n)
        assert check_note_html(render(result), result) == [], n


def test_digests_match_the_files(design: tuple[ReviewResult, dict[str, str]]) -> None:
    result, digests = design
    html = render(result)
    for digest in digests.values():
        assert digest in html
    # FIPS 180-2 appendix B.1 example: SHA-256("abc").
    assert digests["abc.kicad_sch"] == (
        "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
    )
    assert "built-in defaults" not in html.split('id="summary"')[0]


def test_unreadable_file_is_named_not_hashed(tmp_path: Path) -> None:
    gone = str(tmp_path / "gone.kicad_sch")
    html = render(sample_result(1, files=(("gone.kicad_sch", gone),)))
    assert "not readable now (No such file or directory)" in html


def test_no_rules_file_says_built_in_defaults() -> None:
    html = render(sample_result(1))
    assert "built-in defaults (no rules file)" in html


def test_header_names_title_author_date_version() -> None:
    text = "".join(parse_note(render(sample_result(1))).text)
    for part in ("Greenhouse controller", "Tester", "2025-03-01", f"pullproof {__version__}"):
        assert part in text


def test_summary_is_sorted_worst_first() -> None:
    html = render(sample_result())
    summary = html.split('<table class="summary">')[1].split("</table>")[0]
    verdicts = re.findall(r'data-verdict="(\w+)"', summary)
    assert verdicts == ["fail", "incomplete", "marginal", "pass", "pass"]
    findings = html.split('<table class="findings">')[1].split("</table>")[0]
    assert re.findall(r'data-verdict="(\w+)"', findings) == ["fail", "marginal"]


@pytest.mark.parametrize(
    ("nets", "anchors"),
    [
        (["/vents/VENT_LIMIT"], ["net-vents-vent-limit"]),
        (["/A_B", "/A-B", "/a b"], ["net-a-b", "net-a-b-2", "net-a-b-3"]),
        (["/~{RESET}"], ["net-reset"]),
        (["/µ"], ["net-x"]),
        (["/summary"], ["net-summary"]),
    ],
)
def test_anchors_are_slugged_and_unique(nets: list[str], anchors: list[str]) -> None:
    base = sample_result(1)
    nr = base.networks[0]
    nets_results = tuple(replace(nr, network=replace(nr.network, net=n)) for n in nets)
    ctx = note_context(replace(base, networks=nets_results), title="t", date="d")
    assert sorted(v.anchor for v in ctx["networks"]) == sorted(anchors)


def test_ids_never_collide_between_sections() -> None:
    # Net names that slug into another section's entry ids ("net-a" + "-p1", "-h").
    base = sample_result(1)
    nr = base.networks[0]
    nets = ("/A", "/A-p1", "/A-h", "/A_p1")
    result = replace(
        base, networks=tuple(replace(nr, network=replace(nr.network, net=n)) for n in nets)
    )
    assert check_note_html(render(result), result) == []


def test_every_term_refers_to_its_provenance_entry() -> None:
    result = sample_result()
    ctx = note_context(result, title="t", date="d")
    for view in ctx["networks"]:
        numbers = {p.number for p in view.provenance}
        assert numbers == set(range(1, len(numbers) + 1))
        for row in view.rows:
            for t in row.terms:
                entry = view.provenance[t.ref - 1]
                assert (entry.symbol, entry.value) == (t.symbol, t.value)


def test_markup_in_schematic_text_is_escaped() -> None:
    result = hostile_result()
    html = render(result)
    assert HOSTILE not in html
    assert "<b>" not in html
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in html
    parsed = parse_note(html)
    assert parsed.tags["script"] == 0
    text = "".join(parsed.text)
    assert HOSTILE in text and HOSTILE_VALUE in text  # shown as text, intact
    assert check_note_html(html, result) == []


def test_mains_caution_only_on_mains_adjacent_networks() -> None:
    result = sample_result()
    parsed = parse_note(render(result))
    by_net = {s.heading.strip(): s.mains for s in parsed.sections}
    assert by_net == {n.network.net: int(n.network.mains_adjacent) for n in result.networks}
    assert by_net["/ZC_SENSE"] == 1
    html = render(sample_result(4))  # the first four have no mains-adjacent network
    assert "caution-mains" not in html.split("</style>")[1]
    assert "IEC 60664-1" not in html


def test_mains_caution_wording() -> None:
    html = render(sample_result())
    caution = html.split('<aside class="caution-mains"')[1].split("</aside>")[0]
    # REFERENCES.md §7: ELV band per IEC 61140 (confirmed); IEC 60664-1 scope (confirmed).
    for phrase in (
        "isolation barrier",
        "IEC 60664-1",
        "IEC 62368-1",
        "working voltage and surge",
        "50 V AC rms or 120 V ripple-free DC (IEC 61140)",
        "Never work on live circuits",
        "Local codes and licensed practice",
        "U7 has pins on /AC_N",
    ):
        assert phrase in caution


def test_method_appendix_lists_every_formula() -> None:
    result = sample_result()
    html = render(result)
    method = html.split('<section id="method">')[1]
    for nr in result.networks:
        for b in nr.bounds:
            assert jinja2.utils.markupsafe.escape(b.formula) in method
    assert "R_lo = R·(1 − tol)·(1 − TCR·ΔT)" in method
    assert "R_hi = R·(1 + tol)·(1 + TCR·ΔT)" in method
    assert "flowing <em>into</em> an input held high" in method


def test_empty_window_advice_and_missing_values_shown() -> None:
    html = render(sample_result())
    assert "The window is empty — what would open it" in html
    assert "0805 part at 1/8 W" in html
    assert "Missing values and where to add them" in html
    assert "add field &#39;pullproof.family&#39; (e.g. 74HC)" in html


def test_recommendation_lists_candidates_and_pick() -> None:
    html = render(sample_result(1))
    assert "<strong>E24 5.1\u00a0kΩ</strong> at ±5\u00a0% — closest to the geometric centre" in html
    # every candidate carries its IEC 60062 code (470R is the standard's own example form)
    assert (
        "45 E24 values whose whole band fits: 620\u00a0Ω (<code>620R</code>), "
        "680\u00a0Ω (<code>680R</code>)," in html
    )


def test_no_networks_still_renders() -> None:
    result = replace(sample_result(0), findings=(), skipped=())
    html = render(result)
    assert "No pull networks were found in this design." in html
    assert check_note_html(html, result) == []


def test_template_typo_raises(tmp_path: Path) -> None:
    for f in (REPO / "templates").iterdir():
        shutil.copy(f, tmp_path / f.name)
    main = tmp_path / note_mod.TEMPLATE
    main.write_text(main.read_text().replace("{{ nv.chart_text }}", "{{ nv.chart_txt }}"))
    env = note_environment(tmp_path)
    ctx = note_context(sample_result(1), title="t", date="d")
    with pytest.raises(jinja2.UndefinedError, match="chart_txt"):
        env.get_template(note_mod.TEMPLATE).render(**ctx)


def test_templates_ship_where_the_wheel_puts_them() -> None:
    # pyproject force-includes templates/ as pullproof/templates (an installed wheel);
    # an editable install from a source checkout falls back to the top-level folder.
    from importlib import resources

    installed = resources.files("pullproof").joinpath("templates", note_mod.TEMPLATE).is_file()
    assert installed or note_mod._template_dir() == REPO / "templates"
    assert (REPO / "templates" / note_mod.TEMPLATE).is_file()
    assert '"templates" = "pullproof/templates"' in (REPO / "pyproject.toml").read_text()


def test_environment_escapes_and_is_strict() -> None:
    env = note_environment()
    assert env.autoescape is True
    assert env.undefined is jinja2.StrictUndefined


def test_write_note_writes_and_replaces(tmp_path: Path) -> None:
    target = tmp_path / "note.html"
    target.write_text("old", encoding="utf-8")
    write_note(sample_result(1), target, title="t", date="2025-03-01")
    assert target.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert [p.name for p in tmp_path.iterdir()] == ["note.html"]


def test_write_note_failure_leaves_old_note(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    target = tmp_path / "note.html"
    target.write_text("old", encoding="utf-8")

    def broken_replace(src: str, dst: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(note_mod.os, "replace", broken_replace)
    with pytest.raises(PullproofError) as err:
        write_note(sample_result(1), target, title="t", date="d")
    assert str(err.value) == f"{target}: cannot write the note (No space left on device)"
    assert target.read_text(encoding="utf-8") == "old"
    assert [p.name for p in tmp_path.iterdir()] == ["note.html"]


def test_written_note_is_the_rendered_note(tmp_path: Path) -> None:
    # write_note streams the template's pieces into the file: the same text as render_note.
    result = sample_result(40)
    target = tmp_path / "note.html"
    write_note(result, target, title="t", date="2025-03-01")
    assert target.read_text(encoding="utf-8") == render_note(result, title="t", date="2025-03-01")
    assert "".join(stream_note(result, title="t", date="2025-03-01")) == render_note(
        result, title="t", date="2025-03-01"
    )


def test_error_while_streaming_leaves_old_report(tmp_path: Path) -> None:
    # A piece that fails half-way (a template error, say) must not leave half a file.
    target = tmp_path / "note.html"
    target.write_text("old", encoding="utf-8")

    def pieces() -> Iterator[str]:
        yield "<!DOCTYPE html>" * 10_000
        raise RuntimeError("template failed")

    with pytest.raises(RuntimeError):
        write_report(target, pieces(), "note", ())
    assert target.read_text(encoding="utf-8") == "old"
    assert [p.name for p in tmp_path.iterdir()] == ["note.html"]


def test_write_note_into_missing_folder(tmp_path: Path) -> None:
    target = tmp_path / "nowhere" / "note.html"
    with pytest.raises(PullproofError) as err:
        write_note(sample_result(1), target, title="t", date="d")
    assert str(err.value) == f"{target}: cannot write the note (No such file or directory)"
    assert err.value.exit_code == 2


def test_write_note_refuses_to_overwrite_an_input(tmp_path: Path) -> None:
    sch = tmp_path / "greenhouse.kicad_sch"
    sch.write_text("(kicad_sch)", encoding="utf-8")
    result = sample_result(1, files=(("greenhouse.kicad_sch", str(sch)),))
    with pytest.raises(PullproofError) as err:
        write_note(result, sch, title="t", date="d")
    assert str(err.value) == f"{sch}: refusing to write the note over an input of the review"
    assert sch.read_text(encoding="utf-8") == "(kicad_sch)"


# SI prefixes per the SI Brochure (BIPM, 9th ed.) and IEC 60027-1; three significant
# digits and a no-break space before the unit are common practice.
@pytest.mark.parametrize(
    ("quantity", "text"),
    [
        (Q_(4700, "ohm"), "4.7 kΩ"),
        (Q_(1.35e6, "ohm"), "1.35 MΩ"),  # REFERENCES.md §9 example 1
        (Q_(966.67, "ohm"), "967 Ω"),
        (Q_(999.7, "ohm"), "1 kΩ"),  # rounding carries into the next prefix
        (Q_(1e-6, "A"), "1 µA"),
        (Q_(1.6e-3, "A"), "1.6 mA"),
        (Q_(0.8, "V"), "0.8 V"),
        (Q_(3.465, "V"), "3.465 V"),
        (Q_(0.05, "V"), "50 mV"),
        (Q_(100, "nF"), "100 nF"),
        (Q_(1 / 16, "W"), "62.5 mW"),
        (Q_(300e-9, "s"), "300 ns"),
        (Q_(0.05, ""), "5 %"),
        (Q_(100e-6, "1/K"), "100 ppm/K"),
        (Q_(85, "degC"), "85 °C"),
        (Q_(-40, "degC"), "−40 °C"),
    ],
)
def test_format_quantity(quantity: object, text: str) -> None:
    assert format_quantity(quantity).replace("\u00a0", " ") == text


@pytest.mark.parametrize(
    ("window", "text"),
    [
        ((551.25, 47500.0), "551 Ω … 47.5 kΩ"),
        ((None, 1.35e6), "0 … 1.35 MΩ"),
        ((240.0, None), "240 Ω … ∞"),
        ((882.0, 437.5), "empty (882 Ω > 438 Ω)"),
    ],
)
def test_format_window(window: tuple[float | None, float | None], text: str) -> None:
    assert format_window(window).replace("\u00a0", " ") == text


def test_format_ohms_none() -> None:
    assert format_ohms(None) == "—"


@pytest.mark.parametrize(
    ("margin", "side", "text"),
    [
        # the band's room at each edge, as a reader uses it (arithmetic, common practice)
        (407.26, "below", "R_lo is 408×\u00a0the minimum"),  # not "+40726 %"
        (0.23, "below", "R_lo is 23\u00a0% above the minimum"),
        (-0.1, "below", "R_lo is 10\u00a0% below the minimum: not met"),
        (2.0, "above", "the maximum is 3×\u00a0R_hi"),
        (0.1, "above", "the maximum is 10\u00a0% above R_hi"),
        (-0.2, "above", "R_hi is 25\u00a0% above the maximum: not met"),  # 1 / 0.8 = 1.25
        (None, "above", "—"),
    ],
)
def test_margins_read_as_room_at_each_edge(margin: float | None, side: str, text: str) -> None:
    from pullproof.report.format import format_margin

    assert format_margin(margin, side) == text


def test_check_rows_read_as_sentences(tmp_path: Path) -> None:
    from pullproof.review import review

    repo = Path(__file__).resolve().parents[1]
    result = review(repo / "fixtures" / "review" / "interlock_panel.kicad_sch",
                    parts=[repo / "fixtures" / "parts" / "generic_mcu33.toml"])  # fmt: skip
    html = render(result)
    # the example part library's pin tolerates VDD + 0.3 V = 3.6 V; a +5V ± 5 % rail reaches 5.25 V
    assert (
        "The pull rail reaches 5.25\u00a0V but U3 pin 7 tolerates at most 3.6\u00a0V." not in html
    )
    assert "The pull rail reaches 5.25 V but U3 pin 7 tolerates at most 3.6 V." in html
    assert "+40726" not in html and "R_lo is " in html
