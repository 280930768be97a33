"""The shipped demo: `pullproof demo DIR` writes the project and its note; verdicts pinned.

The demo is a greenhouse irrigation controller (see fixtures/make_demo.py). Each expected
verdict below says why a designer expects it and where its numbers come from.
"""

from __future__ import annotations

import hashlib
import math
import os
import subprocess
import sys
from pathlib import Path

import pytest

from builder import SWITCH_PINS, Pin, SchematicBuilder
from notecheck import check_note_html
from pullproof.demo import DEMO_ROOT, demo_files, write_demo
from pullproof.errors import EXIT_INPUT
from pullproof.report.note import render_note
from pullproof.results import OperatingPoint, ReviewResult, Verdict
from pullproof.review import review

REPO = Path(__file__).resolve().parents[1]
REALWORLD = REPO / ".." / "shared" / "realworld"
NOTE = "irrigation-note.html"
SHEETS = ("inputs.kicad_sch", "irrigation.kicad_sch", "mains.kicad_sch", "sensors.kicad_sch")
FILES = tuple(sorted((*SHEETS, "pullproof-parts.toml", "pullproof.toml")))


def run_cli(cwd: Path, *args: str) -> subprocess.CompletedProcess[str]:
    """Run the installed package the way a user would, from a folder outside the repository."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    return subprocess.run(
        [sys.executable, "-m", "pullproof", *args],
        cwd=cwd,
        capture_output=True,
        text=True,
        timeout=120,
        env=env,
        check=False,
    )


@pytest.fixture(scope="module")
def demo_dir(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demo written once by the command line into a folder outside the repository."""
    cwd = tmp_path_factory.mktemp("user")
    done = run_cli(cwd, "demo", "greenhouse")
    assert done.returncode == 0, done.stderr
    assert done.stderr == ""
    return cwd / "greenhouse"


@pytest.fixture(scope="module")
def demo_result(demo_dir: Path) -> ReviewResult:
    return review(demo_dir / DEMO_ROOT)


def test_demo_command_writes_every_file_and_the_note(tmp_path: Path) -> None:
    done = run_cli(tmp_path, "demo", "out")
    assert done.returncode == 0, done.stderr
    out = tmp_path / "out"
    assert sorted(p.name for p in out.iterdir()) == sorted((*FILES, NOTE))
    lines = done.stdout.splitlines()
    assert lines[0] == f"wrote the demo project to {Path('out')}:"
    assert lines[1 : 1 + len(FILES)] == [f"  {Path('out') / name}" for name in FILES]
    assert lines[1 + len(FILES)].startswith(f"wrote the design note {Path('out') / NOTE} (")
    # the copies are byte for byte the shipped files
    for src in demo_files():
        assert (out / src.name).read_bytes() == src.read_bytes()


def test_demo_default_folder(tmp_path: Path) -> None:
    done = run_cli(tmp_path, "demo")
    assert done.returncode == 0, done.stderr
    assert (tmp_path / "pullproof-demo" / NOTE).is_file()


def test_demo_refuses_to_overwrite_without_force(tmp_path: Path) -> None:
    out = tmp_path / "mine"
    out.mkdir()
    (out / "pullproof.toml").write_text("# the user's own rules\n", encoding="utf-8")
    done = run_cli(tmp_path, "demo", "mine")
    assert done.returncode == EXIT_INPUT
    assert done.stderr == (
        f"pullproof: {Path('mine') / 'pullproof.toml'}: already exists; use --force to overwrite\n"
    )
    # nothing was written, and the user's file is untouched
    assert [p.name for p in out.iterdir()] == ["pullproof.toml"]
    assert (out / "pullproof.toml").read_text(encoding="utf-8") == "# the user's own rules\n"


def test_demo_second_run_needs_force(tmp_path: Path) -> None:
    assert run_cli(tmp_path, "demo", "d").returncode == 0
    again = run_cli(tmp_path, "demo", "d")
    assert again.returncode == EXIT_INPUT
    first = Path("d") / "inputs.kicad_sch"
    assert again.stderr == (
        f"pullproof: {first}: already exists (and 6 more); use --force to overwrite\n"
    )
    (tmp_path / "d" / NOTE).write_text("stale", encoding="utf-8")
    forced = run_cli(tmp_path, "demo", "d", "--force")
    assert forced.returncode == 0, forced.stderr
    assert (tmp_path / "d" / NOTE).read_text(encoding="utf-8").startswith("<!DOCTYPE html>")


@pytest.mark.parametrize(
    ("make", "arg", "message"),
    [
        (lambda t: (t / "f.txt").write_text("x"), "f.txt",
         "pullproof: f.txt: is a file, not a folder; choose another folder for the demo\n"),
        (lambda t: (t / "f.txt").write_text("x"), "f.txt/sub",
         f"pullproof: {Path('f.txt/sub')}: cannot create the folder (Not a directory)\n"),
    ],
)  # fmt: skip
def test_demo_errors_are_one_line(tmp_path: Path, make: object, arg: str, message: str) -> None:
    assert callable(make)
    make(tmp_path)
    done = run_cli(tmp_path, "demo", arg)
    assert done.returncode == EXIT_INPUT
    assert done.stderr == message
    assert done.stdout == ""


@pytest.mark.skipif(os.name != "posix" or os.geteuid() == 0, reason="root may write anywhere")
def test_demo_into_a_read_only_folder(tmp_path: Path) -> None:
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o555)
    try:
        done = run_cli(tmp_path, "demo", "locked")
    finally:
        locked.chmod(0o755)
    assert done.returncode == EXIT_INPUT
    assert done.stderr == "pullproof: locked: folder is not writable\n"


# net → expected verdict. Numbers: rails from the demo rules (+3V3 ± 3 %, +5V ± 5 %), margin
# 0.1 V, 0603 chips at 0.1 W with 50 % derating (common practice), part data from the demo
# part library (example data, marked so in the note).
EXPECTED = {
    # Gold tactile switch: wetting 0.1 mA (common practice, from memory) caps R at
    # 3.201 V / 0.1 mA = 32 kΩ; 10 k and 22 k sit well inside.
    "/BTN_MENU": Verdict.PASS,
    "/BTN_OK": Verdict.PASS,
    # Reed float switch needing 1 mA wetting current (common practice): R ≤ 3.2 kΩ, and
    # a 100 k pull-up starves the contact.
    "/FLOAT_TANK": Verdict.FAIL,
    # Pulled up to +5V into a 3.3 V-only pin (input tolerance VDD + 0.3 V, example data).
    "/FLOW_PULSE": Verdict.FAIL,
    # Open-drain alarm output with no sink or leakage data: cannot be judged yet.
    "/ALERT": Verdict.INCOMPLETE,
    # Two 74LS inputs tied together each source IIL = 0.4 mA (handbook 74LS table,
    # confirmed): R ≤ (0.8 V − 0.1 V) / 0.8 mA = 875 Ω; 680 Ω meets every hard limit but sits
    # below the preferred 1 kΩ (soft), so the designer is asked to look again.
    "/inputs/LID_SW": Verdict.MARGINAL,
    # 74HC14 at 3.3 V (JEDEC JESD7A levels, from memory), 4k7 with a 4.7 µF debounce
    # capacitor: hold-off and 0.5 mA wetting both met.
    "/inputs/DOOR_SW": Verdict.PASS,
    # Optocoupler output: CTR 50 % × ageing 50 % × I_F 2 mA = 0.5 mA sink (CTR ageing to half,
    # common practice); 22 k leaves the transistor saturated.
    "/PUMP_AC_OK": Verdict.PASS,
    # 100 k gate pull-down holds the pump off while the MCU pin floats in reset.
    "/PUMP_EN": Verdict.PASS,
    # I2C Standard-mode lines at 150 pF: 4k7 between Rp(min) and Rp(max) (UM10204 §7.1).
    "/SCL": Verdict.PASS,
    "/SDA": Verdict.PASS,
}


def test_demo_verdict_per_net(demo_result: ReviewResult) -> None:
    got = {nr.network.net: nr.verdict for nr in demo_result.networks}
    assert got == EXPECTED


def test_demo_has_every_verdict(demo_result: ReviewResult) -> None:
    assert {nr.verdict for nr in demo_result.networks} == set(Verdict)
    assert 10 <= len(demo_result.networks) <= 14


def test_demo_mains_adjacent_network(demo_result: ReviewResult) -> None:
    mains = {nr.network.net: nr.network.mains_reason for nr in demo_result.networks
             if nr.network.mains_adjacent}  # fmt: skip
    assert list(mains) == ["/PUMP_AC_OK"]
    assert "U20" in mains["/PUMP_AC_OK"]


def test_demo_findings(demo_result: ReviewResult) -> None:
    found = {(f.kind, f.net, f.severity) for f in demo_result.findings}
    assert found == {
        ("rail-above-input-tolerance", "/FLOW_PULSE", Verdict.FAIL),
        ("floating-input", "/inputs/RAIN_SW", Verdict.FAIL),  # a 74HC14 input, not an MCU pin
    }
    skipped = {(s.ref, s.reason.split(":")[0]) for s in demo_result.skipped}
    assert ("R1", "LED series resistor") in skipped


def window(result: ReviewResult, net: str) -> tuple[float | None, float | None]:
    return next(nr.window for nr in result.networks if nr.network.net == net)


@pytest.mark.parametrize(
    ("net", "side", "expected"),
    [
        # 74LS IIL 0.4 mA per input, VIL 0.8 V (handbook 74LS table, confirmed), two inputs.
        ("/inputs/LID_SW", 1, (0.8 - 0.1) / (2 * 0.4e-3)),
        # contact rating: 5.25 V / 100 mA, the interlock's stated rating (Ohm's law)
        ("/inputs/LID_SW", 0, 5.25 / 0.1),
        # wetting current: V_min / I_wet = 3.3 V × 0.97 / 1 mA (common practice)
        ("/FLOAT_TANK", 1, 3.3 * 0.97 / 1e-3),
        # UM10204 §7.1 eq. (2): (VDD − VOL) / 3 mA with VOL = 0.4 V (confirmed)
        ("/SDA", 0, (3.3 * 1.03 - 0.4) / 3e-3),
        # UM10204 §7.1 eq. (1): t_r / (ln(7/3) · C_b); Standard-mode t_r = 1000 ns (from memory)
        ("/SDA", 1, 1000e-9 / (math.log(7 / 3) * 150e-12)),
    ],
)
def test_demo_limits_match_published_values(
    demo_result: ReviewResult, net: str, side: int, expected: float
) -> None:
    got = window(demo_result, net)[side]
    assert got == pytest.approx(expected, rel=1e-3)


def op(result: ReviewResult, net: str) -> OperatingPoint:
    found = next(nr.operating for nr in result.networks if nr.network.net == net)
    assert found is not None
    return found


def test_demo_operating_points(demo_result: ReviewResult) -> None:
    # Ohm's law: 10 kΩ ±5 % with 200 ppm/K over −10…55 °C (rules defaults, common practice)
    # bottoms out at 10 kΩ · 0.95 · (1 − 200e-6 · 35) = 9.434 kΩ; +3V3 + 3 % = 3.399 V
    menu = op(demo_result, "/BTN_MENU")
    r_lo = 10e3 * 0.95 * (1 - 200e-6 * 35)
    assert menu.current_max.value is not None
    assert menu.current_max.value.magnitude("A") == pytest.approx(3.399 / r_lo, rel=1e-9)
    # Joule heating: P = V² / R_lo
    assert menu.power.value is not None
    assert menu.power.value.magnitude("W") == pytest.approx(3.399**2 / r_lo, rel=1e-9)
    # RC step response: the optocoupler's edge starts at its V_CE(sat) (example part data)
    assert "from V_CE(sat)(U20) = 200 mV" in op(demo_result, "/PUMP_AC_OK").edge.note
    # the float-switch cable's 300 pF (rules [[net]] capacitance) plus the MCU pin's 5 pF
    tank = op(demo_result, "/FLOAT_TANK").edge
    caps = {t.symbol: t.value.magnitude("F") for t in tank.terms if t.symbol.startswith("C")}
    assert caps == {"C_wiring": pytest.approx(300e-12), "C_in(U2 pin 5)": pytest.approx(5e-12)}
    # UM10204 §7.1: t_r = 0.8473 · R_hi · C_b on the I2C lines, 150 pF from the demo rules
    sda = op(demo_result, "/SDA")
    r_hi = 4.7e3 * 1.05 * (1 + 200e-6 * 35)
    assert sda.edge.value is not None
    assert sda.edge.value.magnitude("s") == pytest.approx(0.8473 * r_hi * 150e-12, rel=1e-9)


def test_demo_note_shows_operating_points_and_codes(demo_dir: Path) -> None:
    html = (demo_dir / NOTE).read_text(encoding="utf-8")
    assert html.count('<table class="oppoint">') == len(EXPECTED)
    assert html.count('class="op-row fitted"') == len(EXPECTED)
    assert "<code>4K7</code>" in html  # IEC 60062 code beside each candidate (4K7: its example)


def test_demo_resistors_on_the_mains_are_checked(demo_result: ReviewResult) -> None:
    # 230 V AC over R20 + R21 (47 kΩ ±1 %, 1206 at 200 V, common practice): the worst share of
    # one is 230 · 47.47 / (47.47 + 46.53) = 116.1 V (Ohm's law), within 200 V
    got = {c.ref: (c.ok, c.chain) for c in demo_result.resistor_voltages}
    assert got == {"R20": (True, ("R20", "R21")), "R21": (True, ("R20", "R21"))}
    volts = {c.ref: c.volts for c in demo_result.resistor_voltages}
    assert volts["R20"] == pytest.approx(230 * 47.47 / 94.0)
    assert [h.net for h in demo_result.hazardous_nets] == ["/mains/AC_L", "/mains/AC_N"]


def test_demo_note_is_sound(demo_dir: Path, demo_result: ReviewResult) -> None:
    html = (demo_dir / NOTE).read_text(encoding="utf-8")
    assert check_note_html(html, demo_result) == []


def test_demo_note_digests_match_the_files(demo_dir: Path) -> None:
    html = (demo_dir / NOTE).read_text(encoding="utf-8")
    for name in (*SHEETS, "pullproof.toml"):  # the rules file is identified too
        digest = hashlib.sha256((demo_dir / name).read_bytes()).hexdigest()
        assert digest in html, name


def test_write_demo_api(tmp_path: Path) -> None:
    out = write_demo(tmp_path / "api")
    assert out.root == tmp_path / "api" / DEMO_ROOT
    assert out.note == tmp_path / "api" / NOTE
    assert [p.name for p in out.files] == list(FILES)


@pytest.mark.skipif(
    not (REALWORLD / "dispensy" / "dispensy.kicad_sch").is_file(),
    reason="the real-world corpus ../shared/realworld is not next to the repository",
)
def test_realworld_note_is_sound(tmp_path: Path) -> None:
    result = review(REALWORLD / "dispensy" / "dispensy.kicad_sch")
    html = render_note(result, title="dispensy", date="2025-03-01")
    assert check_note_html(html, result) == []


def test_markup_in_schematic_text_is_escaped(tmp_path: Path) -> None:
    hostile = '<b>&"'
    b = SchematicBuilder()
    b.resistor("R1", "10k", at=(50.8, 50.8), fields={"Tolerance": "5%"})
    b.power("+3V3", at=b.pin_point("R1", "1"))
    b.part("U1", "74xx:74HC14", pins=(Pin("1", (-7.62, 0), "input"),), at=(76.2, 58.42),
           value=f"74HC14 {hostile}")  # fmt: skip
    b.part("SW1", "Switch:SW_Push", pins=SWITCH_PINS, at=(50.8, 66.04), value=hostile)
    b.wire(b.pin_point("R1", "2"), b.pin_point("U1", "1"))
    b.wire(b.pin_point("R1", "2"), b.pin_point("SW1", "1"))
    b.label(f"KEY{hostile}", at=b.pin_point("R1", "2"))
    b.power("GND", at=b.pin_point("SW1", "2"))
    root = b.write(tmp_path / "panel.kicad_sch")
    result = review(root)
    assert [nr.network.net for nr in result.networks] == [f"/KEY{hostile}"]
    html = render_note(result, title=f"panel {hostile}", date="2025-03-01")
    assert hostile not in html
    assert "KEY&lt;b&gt;&amp;" in html
    assert check_note_html(html, result) == []


def test_a_rating_read_from_the_size_is_an_assumed_soft_limit(demo_result: ReviewResult) -> None:
    # 5.25 V² / (0.1 W × 50 %): the 0603 size's generic rating (common practice) stands in
    # for the fitted resistor's, so the limit is soft and says so
    lid = next(nr for nr in demo_result.networks if nr.network.net == "/inputs/LID_SW")
    power = next(b for b in lid.bounds if b.constraint == "resistor-power")
    assert power.ohms == pytest.approx(5.25**2 / 0.05, rel=1e-3)
    assert not power.hard and power.title.endswith("(assumed)")
    assert power.assumed == ("assumed rating of size 0603",)
