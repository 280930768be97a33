"""Tests of ``pullproof annotate``: hidden result fields spliced into the schematic text."""

from __future__ import annotations

import datetime as dt
import json
import os
import re
import shutil
import uuid
from pathlib import Path

import pytest

from conftest import FIXTURES, REALWORLD
from pullproof.annotate import (
    FIELDS,
    AnnotateError,
    apply_annotation,
    format_plan,
    plan_annotation,
    window_text,
)
from pullproof.cli import main
from pullproof.nets import build_circuit
from pullproof.review import review
from pullproof.sexpr import Node, parse

DAY = dt.date(2031, 5, 4)
V6, V8, V10 = 20211123, 20231120, 20260306

# A property node written by annotate, whatever its layout (one line or many).
_OURS = re.compile(r'\s*\(property "pullproof\.(?:verdict|window|recommended|reason|reviewed)"'
                   r'(?:[^()"]|"(?:[^"\\]|\\.)*"|\((?:[^()"]|"(?:[^"\\]|\\.)*"|\((?:[^()]|'
                   r'\([^()]*\))*\))*\))*\)')  # fmt: skip


def _strip(text: str) -> str:
    return _OURS.sub("", text)


def _partition(root: Path) -> set[frozenset[tuple[str, str]]]:
    return {frozenset((m.ref, m.pin) for m in n.members) for n in build_circuit(root).nets}


def _verdicts(root: Path) -> dict[str, str]:
    return {n.network.net: n.verdict.value for n in review(root).networks}


def _texts(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.glob("*.kicad_sch"))}


def _props(sym: Node) -> dict[str, Node]:
    return {str(p.atom(0)): p for p in sym.nodes("property")}


def _symbol(text: str, ref: str) -> Node:
    for sym in parse(text, "t").nodes("symbol"):
        ref_prop = _props(sym).get("Reference")
        if ref_prop is not None and ref_prop.atom(1) == ref:
            return sym
    raise KeyError(ref)


def _bench(tmp_path: Path, version: int) -> Path:
    """A 10k pull-up to +5V on a 74HC14 input, with a push button to ground."""
    from builder import HEX_INVERTER_PINS, SWITCH_PINS, SchematicBuilder

    b = SchematicBuilder(version=version)
    b.resistor(
        "R1", "10k", at=(50.8, 50.8),
        fields={"Footprint": "Resistor_SMD:R_0603_1608Metric", "pullproof.role": "pull"},
    )  # fmt: skip
    b.power("+5V", at=b.pin_point("R1", "1"))
    b.part("U1", "74xx:74HC14", pins=HEX_INVERTER_PINS, at=(76.2, 58.42), value="74HC14")
    b.part("SW1", "Switch:SW_Push", pins=SWITCH_PINS, at=(50.8, 76.2), value="SW_Push",
           fields={"pullproof.contact_max": "50mA"})  # fmt: skip
    b.power("GND", at=b.pin_point("SW1", "2"))
    b.wire(b.pin_point("R1", "2"), b.pin_point("U1", "1"))
    b.wire(b.pin_point("R1", "2"), b.pin_point("SW1", "1"))
    return b.write(tmp_path / "bench.kicad_sch")


def _multiline(path: Path, unit: str) -> Path:
    """Rewrite the builder's one-line symbols with one list per line, as the editor does."""
    text = path.read_text(encoding="utf-8")
    text = text.replace(" (property ", f"\n{unit * 2}(property ").replace(
        " (instances ", f"\n{unit * 2}(instances "
    )
    path.write_text(text, encoding="utf-8")
    return path


# ------------------------------------------------------------------ field values


@pytest.mark.parametrize(
    ("window", "text"),
    [
        # the letter-and-digit code of IEC 60062 (4K7, 680R); edges rounded inward to 3 figures
        ((2200.0, 141000.0), "2K2..141K"),
        ((2201.0, 141099.0), "2K21..141K"),
        ((551.2, None), "552R..∞"),
        ((None, 860300.0), "0..860K"),
        ((None, None), "0..∞"),
        ((5000.0, 3000.0), "empty: 5K0 > 3K0"),
        ((1.5e6, 2.2e6), "1M5..2M2"),
    ],
)
def test_window_text(window: tuple[float | None, float | None], text: str) -> None:
    assert window_text(window) == text


# ------------------------------------------------------------------ dialects


@pytest.mark.parametrize("version", [V6, V8, V10])
@pytest.mark.parametrize("layout", ["one-line", "multi-line"])
def test_write_adds_hidden_fields_in_the_file_dialect(
    tmp_path: Path, version: int, layout: str
) -> None:
    root = _bench(tmp_path, version)
    unit = "\t" if version >= V10 else "  "
    if layout == "multi-line":
        _multiline(root, unit)
    before = root.read_text(encoding="utf-8")
    partition, verdicts = _partition(root), _verdicts(root)

    apply_annotation(plan_annotation(root, today=DAY))
    after = root.read_text(encoding="utf-8")

    props = _props(_symbol(after, "R1"))
    assert [k for k in props if k.startswith("pullproof.")] == ["pullproof.role", *FIELDS]
    # the bench resistor states no tolerance or TCR: the pass rests on the rules' assumed
    # defaults, and the field says so
    assert props["pullproof.verdict"].atom(1) == "pass (assumed)"
    assert props["pullproof.reviewed"].atom(1) == "pullproof 0.1.0, 2031-05-04"
    assert props["pullproof.recommended"].atom(1).endswith("(E24)")
    for name in FIELDS:
        node = props[name]
        at = node.first("at")
        assert at is not None and at.atoms() == (50.8, 50.8, 0)  # at the symbol's anchor
        effects = node.first("effects")
        assert effects is not None
        if version >= V10:  # v10 puts (hide yes) in the property itself
            assert node.first("hide") is not None and node.first("hide").atom(0) == "yes"  # type: ignore[union-attr]
        elif version >= V8:
            assert effects.first("hide") is not None
        else:
            assert "hide" in effects.atoms()
        assert node.first("id") is None  # the fixture's properties carry no ids
    if layout == "multi-line":
        assert "\n" + unit * 2 + '(property "pullproof.verdict"' in after
    else:
        assert after.count("\n") == before.count("\n")
    assert _strip(after) == before  # every other byte is unchanged
    assert _partition(root) == partition
    assert _verdicts(root) == verdicts


def test_v6_ids_are_unique_and_continue_the_symbol(tmp_path: Path) -> None:
    from builder import V6 as BUILDER_V6

    root = _bench(tmp_path, BUILDER_V6)
    text = root.read_text(encoding="utf-8")
    # v6 numbers the properties of each placed symbol 0, 1, 2 …; give the fixture's ids
    lines = []
    for line in text.splitlines(keepends=True):
        parts = re.split(r'(\(property "[^"]*" "[^"]*")', line)
        for i, n in zip(range(1, len(parts), 2), range(100), strict=False):
            parts[i] += f" (id {n})"
        lines.append("".join(parts))
    text = "".join(lines)
    root.write_text(text, encoding="utf-8")
    apply_annotation(plan_annotation(root, today=DAY))
    props = _props(_symbol(root.read_text(encoding="utf-8"), "R1"))
    ids = [p.first("id").atom(0) for p in props.values()]  # type: ignore[union-attr]
    assert len(ids) == len(set(ids))
    assert [props[n].first("id").atom(0) for n in FIELDS] == [4, 5, 6, 7, 8]  # type: ignore[union-attr]


def test_crlf_and_byte_order_mark_are_kept(tmp_path: Path) -> None:
    root = _multiline(_bench(tmp_path, V8), "  ")
    root.write_bytes(b"\xef\xbb\xbf" + root.read_bytes().replace(b"\n", b"\r\n"))
    apply_annotation(plan_annotation(root, today=DAY))
    data = root.read_bytes()
    assert data.startswith(b"\xef\xbb\xbf(kicad_sch")
    assert data.count(b"\n") == data.count(b"\r\n")
    assert b'"pullproof.verdict" "pass (assumed)"' in data


# ------------------------------------------------------------------ the demo


@pytest.fixture
def demo(tmp_path: Path) -> Path:
    shutil.copytree(FIXTURES / "demo", tmp_path / "demo")
    return tmp_path / "demo" / "irrigation.kicad_sch"


def test_dry_run_writes_nothing_and_lists_the_fields(
    demo: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    before = _texts(demo.parent)
    assert main(["annotate", str(demo)]) == 0
    assert _texts(demo.parent) == before
    out = capsys.readouterr().out
    assert out.splitlines()[0].endswith("(dry run: nothing written; add --write to write)")
    assert "inputs.kicad_sch:" in out
    assert re.search(r"^  R12 +add +pullproof\.verdict += fail$", out, re.M)
    # the demo rules state the 0603 rating, 0.1 W: the window opens at
    # 5.25 V² / (0.1 W × 50 % derating) = 551.25 Ω (Joule heating; derating common practice)
    assert re.search(r"^  R13 +add +pullproof\.window += 552R\.\.875R$", out, re.M)
    # the climate sensor's alarm output states no sink data: its verdict rests on the
    # open-drain class, and the field says so
    assert re.search(r"^  R32 +add +pullproof\.verdict += pass \(assumed\)$", out, re.M)
    assert out.rstrip().endswith(
        "would write 60 new, 0 changed and 0 removed fields on 12 symbols in 4 files"
    )
    assert "R1 " not in out  # the LED series resistor is set aside and gets no fields


def test_write_then_reread_and_idempotent(demo: Path, capsys: pytest.CaptureFixture[str]) -> None:
    before = _texts(demo.parent)
    partition, verdicts = _partition(demo), _verdicts(demo)
    assert main(["annotate", str(demo), "--write"]) == 0
    assert "wrote 60 new" in capsys.readouterr().out
    once = _texts(demo.parent)
    assert once != before
    for name, data in once.items():
        assert _strip(data.decode("utf-8")) == before[name].decode("utf-8")
    assert _partition(demo) == partition
    assert _verdicts(demo) == verdicts
    # a second run on another day: the results are unchanged, so is every byte
    apply_annotation(plan_annotation(demo, today=DAY + dt.timedelta(days=30)))
    assert _texts(demo.parent) == once
    assert main(["annotate", str(demo)]) == 0
    assert "every field is up to date; nothing to write" in capsys.readouterr().out


def test_changed_result_replaces_fields_in_place(demo: Path) -> None:
    apply_annotation(plan_annotation(demo, today=DAY))
    inputs = demo.parent / "inputs.kicad_sch"
    text = inputs.read_text(encoding="utf-8")
    inputs.write_text(text.replace('(property "Value" "100k"', '(property "Value" "2k2"'), "utf-8")
    plan = plan_annotation(demo, today=DAY + dt.timedelta(days=1))
    apply_annotation(plan)
    out = format_plan(plan, written=True)
    assert re.search(r"R12 +change +pullproof\.verdict +fail -> pass", out)
    assert "pullproof 0.1.0, 2031-05-05" in out
    props = _props(_symbol(inputs.read_text(encoding="utf-8"), "R12"))
    assert props["pullproof.verdict"].atom(1) == "pass"
    assert sum(1 for k in props if k == "pullproof.verdict") == 1


def test_stale_fields_are_removed_when_no_longer_judged(demo: Path) -> None:
    apply_annotation(plan_annotation(demo, today=DAY))
    inputs = demo.parent / "inputs.kicad_sch"
    text = inputs.read_text(encoding="utf-8")
    marked = text.replace(
        '(property "Value" "10k" (at 0 0 0))',
        '(property "Value" "10k" (at 0 0 0)) (property "pullproof.role" "skip" (at 0 0 0))',
    )
    inputs.write_text(marked, encoding="utf-8")
    plan = plan_annotation(demo, today=DAY)
    (edit,) = [e for e in plan.edits if e.changed]
    assert {(c.refs, c.action) for c in edit.changes if c.action != "keep"} == {("R10", "remove")}
    apply_annotation(plan)
    assert "pullproof.verdict" not in _props(_symbol(inputs.read_text(encoding="utf-8"), "R10"))


def test_selection_annotates_only_the_chosen(demo: Path) -> None:
    main(["annotate", str(demo), "--ref", "R13", "--write"])
    texts = _texts(demo.parent)
    assert texts["inputs.kicad_sch"].count(b'"pullproof.verdict"') == 1
    assert b'"pullproof.verdict"' not in texts["sensors.kicad_sch"]


# ------------------------------------------------------------------ safety


def test_failing_replace_leaves_every_original(
    demo: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    before = _texts(demo.parent)
    real = os.replace
    calls = []

    def flaky(src: str, dst: str) -> None:
        calls.append(dst)
        if len(calls) == 3:  # two files already replaced, the third fails
            raise PermissionError(13, "Permission denied")
        real(src, dst)

    monkeypatch.setattr(os, "replace", flaky)
    assert main(["annotate", str(demo), "--write"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("pullproof: ") and err.rstrip().endswith(
        "cannot replace the file: Permission denied; nothing written"
    )
    assert len(err.strip().splitlines()) == 1
    assert _texts(demo.parent) == before
    assert sorted(p.name for p in demo.parent.iterdir() if p.name.startswith(".")) == []


def test_file_changed_since_reading_is_not_overwritten(demo: Path) -> None:
    plan = plan_annotation(demo, today=DAY)
    inputs = demo.parent / "inputs.kicad_sch"
    inputs.write_text(inputs.read_text(encoding="utf-8") + "\n", encoding="utf-8")
    edited = _texts(demo.parent)
    with pytest.raises(AnnotateError, match="the file changed since it was read; nothing written"):
        apply_annotation(plan)
    assert _texts(demo.parent) == edited


def test_file_mode_is_kept(demo: Path) -> None:
    inputs = demo.parent / "inputs.kicad_sch"
    inputs.chmod(0o640)
    apply_annotation(plan_annotation(demo, today=DAY))
    assert inputs.stat().st_mode & 0o777 == 0o640


def test_malformed_schematic_is_one_line_exit_2(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    bad = tmp_path / "bad.kicad_sch"
    bad.write_text("(kicad_sch (version 20231120)\n  (symbol\n", encoding="utf-8")
    assert main(["annotate", str(bad), "--write"]) == 2
    assert capsys.readouterr().err.strip() == (
        f"{bad}:2:3: unclosed '(': missing ')' before the end of the file"
    )
    assert bad.read_text(encoding="utf-8") == "(kicad_sch (version 20231120)\n  (symbol\n"


# ------------------------------------------------------------------ a sheet used twice


def test_sheet_used_twice_writes_the_worse_verdict(tmp_path: Path) -> None:
    from builder import HEX_INVERTER_PINS, SchematicBuilder

    root_b = SchematicBuilder()
    a_uuid, b_uuid = str(uuid.uuid4()), str(uuid.uuid4())
    child = SchematicBuilder()
    # a 10k pull-down: fine on a CMOS (HC) input, too large for the current a TTL (LS)
    # input sources when low (handbook family tables)
    child.resistor(
        "R5", "10k", at=(50.8, 50.8),
        instances={f"/{root_b.uuid}/{a_uuid}": "R5", f"/{root_b.uuid}/{b_uuid}": "R105"},
    )  # fmt: skip
    child.power("GND", at=child.pin_point("R5", "2"))
    child.label("IN", at=child.pin_point("R5", "1"), kind="hierarchical_label")
    child.write(tmp_path / "pulldown.kicad_sch")
    root_b.sheet("A", "pulldown.kicad_sch", at=(20, 20), pins={"IN": (40, 20)}, uuid=a_uuid)
    root_b.sheet("B", "pulldown.kicad_sch", at=(20, 80), pins={"IN": (40, 80)}, uuid=b_uuid)
    root_b.part("U1", "74xx:74HC14", pins=HEX_INVERTER_PINS, at=(76.2, 20), value="74HC14")
    root_b.part("U2", "74xx:74LS14", pins=HEX_INVERTER_PINS, at=(76.2, 80), value="74LS14")
    root_b.wire((40, 20), root_b.pin_point("U1", "1"))
    root_b.wire((40, 80), root_b.pin_point("U2", "1"))
    root = root_b.write(tmp_path / "board.kicad_sch")

    verdicts = {n.network.resistor.refs: n.verdict.value for n in review(root).networks}
    assert verdicts == {("R5",): "pass", ("R105",): "fail"}
    plan = plan_annotation(root, today=DAY)
    out = format_plan(plan, written=False)
    assert (
        "note: R105/R5 share one symbol (sheet used twice) with different verdicts "
        "(R105 fail, R5 pass); writing the worse, from R105"
    ) in out
    apply_annotation(plan)
    props = _props(_symbol((tmp_path / "pulldown.kicad_sch").read_text("utf-8"), "R5"))
    assert props["pullproof.verdict"].atom(1) == "fail"
    assert (tmp_path / "board.kicad_sch").read_text("utf-8").count("pullproof.") == 0


# ------------------------------------------------------------------ real designs


def _realworld_projects() -> list[str]:
    if not REALWORLD.is_dir():
        return []
    return sorted(p.name for p in REALWORLD.iterdir() if (p / "files.json").is_file())


@pytest.mark.skipif(
    not REALWORLD.is_dir(),
    reason="the real-world corpus ../shared/realworld is not next to the repository",
)
@pytest.mark.parametrize("project", _realworld_projects())
def test_realworld_write_keeps_the_nets(tmp_path: Path, project: str) -> None:
    shutil.copytree(REALWORLD / project, tmp_path / project)
    for copy in (tmp_path / project).glob("*.kicad_sch"):
        copy.chmod(0o644)  # the corpus is read-only; the user's own copy is writable
    info = json.loads((tmp_path / project / "files.json").read_text(encoding="utf-8"))
    root = tmp_path / project / info["root_schematic"]
    before = _texts(root.parent)
    partition, verdicts = _partition(root), _verdicts(root)
    written = apply_annotation(plan_annotation(root, today=DAY))
    assert written, "every corpus design has at least one judged pull"
    assert _partition(root) == partition
    assert _verdicts(root) == verdicts
    for name, data in _texts(root.parent).items():
        assert _strip(data.decode("utf-8")) == before[name].decode("utf-8")
    once = _texts(root.parent)
    apply_annotation(plan_annotation(root, today=DAY))
    assert _texts(root.parent) == once
