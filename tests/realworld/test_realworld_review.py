"""Review the public real-world designs: no traceback, and every rail-tied resistor accounted for.

../shared/realworld/SOURCES.md lists, per project, the resistors with one pad on a rail and
the other on a signal net ("pull-up/pull-down-like resistors", found from the boards). Each
must come out either as a judged network on the right net or set aside with the right
reason. The reasons are facts of the trade (common practice): a resistor feeding only an
LED limits its current; 5.1 kΩ from a USB-C CC pin to ground advertises a sink; a resistor
from an op-amp input to ground sets gain or bias; a resistor from a connector shell to ground
bleeds the shield; an up/down pair into an ADC pin divides a voltage to measure it.
"""

from __future__ import annotations

import json
from functools import cache
from pathlib import Path

import pytest

from pullproof.cli import main
from pullproof.results import ReviewResult, Verdict
from pullproof.review import review

SHARED = Path(__file__).resolve().parents[2] / ".." / "shared" / "realworld"
ROOTS = {
    "dispensy": "dispensy/dispensy.kicad_sch",
    "gekkio-mbctest": "gekkio-mbctest/GB-MBCTEST.kicad_sch",
    "europi": "europi/europi-surface-mount.kicad_sch",
    "bablokb-buttonbar": "bablokb-buttonbar/buttonbar.kicad_sch",
    "openbook-c1": "openbook-c1/OSO-BOOK-C1.kicad_sch",
}

pytestmark = pytest.mark.skipif(
    not (SHARED / "SOURCES.md").is_file(), reason=f"real-world schematics not present at {SHARED}"
)

NET, SKIP = "network", "skipped"
LED = "LED series resistor"
# a pull-down on an op-amp's inverting input whose net also holds the feedback resistor: the
# two divide the output and set the gain (common practice)
OPAMP = "divider or gain network into an analog input"
# project → ref → ("network", net name) or ("skipped", fragment of the reason)
EXPECTED: dict[str, dict[str, tuple[str, str]]] = {
    "dispensy": {
        "R1": (NET, "/PI/I2C_SCL"),
        "R2": (NET, "/PI/I2C_SDA"),
        "R4": (NET, "/PI/SPI_FLASH.SS"),
        "R10": (NET, "net@R10.1"),  # the RP2040 RUN pin
        "R6": (NET, "net@R6.2"),  # four pull-ups on the 74HC165 parallel inputs
        "R7": (NET, "net@R7.2"),
        "R8": (NET, "net@R8.2"),
        "R9": (NET, "net@R9.2"),
        "R15": (SKIP, "USB-C configuration resistor: the net reaches U15 pin CC2"),
        "R20": (SKIP, "USB-C configuration resistor: the net reaches U15 pin CC1"),
        "R3": (SKIP, "shield or chassis bleed resistor: the net reaches only shield pins"),
        "R16": (SKIP, "shield or chassis bleed resistor: the net joins only pins 17, 18, 19"),
        "R17": (SKIP, "shield or chassis bleed resistor: the net is a shield net"),
        "R21": (SKIP, LED),
        "R22": (SKIP, LED),
        # +VDC divided into GPIO26_ADC0: a measurement, not a logic level
        "R24": (SKIP, "divider into an analog or feedback node: the net reaches U10 pin GPIO26"),
        "R25": (SKIP, "divider into an analog or feedback node: the net reaches U10 pin GPIO26"),
    },
    "gekkio-mbctest": {
        "R2": (NET, "/MBC/~{MBC_RAM_CS}"),
        "R3": (NET, "/MBC/~{MBC_ROM_CS}"),
    },
    "europi": {
        "R5": (NET, "BUTTON_1"),
        "R6": (NET, "BUTTON_2"),
        "R40": (NET, "DIGITAL_IN"),
        **{r: (SKIP, OPAMP) for r in ("R7", "R8", "R19", "R20", "R31", "R32")},
    },
    "bablokb-buttonbar": {
        **{r: (NET, f"net@{r}.2") for r in ("R1", "R3", "R5", "R7", "R9", "R11")},
        **{f"R{n}": (SKIP, LED) for n in range(13, 19)},
    },
    "openbook-c1": {
        "R3": (NET, "/BABEL_CS"),
        "R4": (NET, "/SD_CS"),
    },
}  # fmt: skip


@cache
def reviewed(project: str) -> ReviewResult:
    return review(SHARED / ROOTS[project])


def test_table_covers_sources_md() -> None:
    # every resistor SOURCES.md lists under "pull-up/pull-down-like resistors" is pinned here
    text = (SHARED / "SOURCES.md").read_text(encoding="utf-8")
    for project, table in EXPECTED.items():
        section = text.split(f"### {project}", 1)[1].split("###", 1)[0]
        line = next(ln for ln in section.splitlines() if "pull-up/pull-down-like" in ln)
        listed = {item.split("(")[0].strip() for item in line.split(":", 1)[1].split(";")}
        listed = {ref.rsplit(" ", 1)[-1] for ref in listed}
        assert listed == set(table), project


@pytest.mark.parametrize(
    ("project", "ref", "how", "what"),
    [(p, ref, how, what) for p, t in EXPECTED.items() for ref, (how, what) in t.items()],
)
def test_each_listed_resistor(project: str, ref: str, how: str, what: str) -> None:
    result = reviewed(project)
    judged = {r: n.network.net for n in result.networks for r in n.network.resistor.refs}
    skipped = {s.ref: s.reason for s in result.skipped}
    if how == NET:
        assert judged.get(ref) == what, skipped.get(ref)
    else:
        assert ref not in judged
        assert what in skipped.get(ref, ""), skipped.get(ref)


@pytest.mark.parametrize("project", sorted(ROOTS))
def test_cli_reviews_without_traceback(project: str, capsys: pytest.CaptureFixture[str]) -> None:
    code = main(["review", str(SHARED / ROOTS[project]), "--json"])
    captured = capsys.readouterr()
    assert code in (0, 1), captured.err
    assert captured.err == ""
    doc = json.loads(captured.out)
    assert doc["schema"] == "pullproof.review/1"
    assert main(["review", str(SHARED / ROOTS[project])]) == code
    assert "Traceback" not in capsys.readouterr().err


def test_buttonbar_needs_its_rail(tmp_path: Path) -> None:
    # /Vcc states no voltage: incomplete until the rules say what it is
    plain = reviewed("bablokb-buttonbar")
    assert {n.verdict for n in plain.networks} == {Verdict.INCOMPLETE}
    assert all("rail Vcc is unknown" in n.reason for n in plain.networks)
    rules = tmp_path / "pullproof.toml"
    rules.write_text('[rails]\nVcc = "3V3"\n', encoding="utf-8")
    described = review(SHARED / ROOTS["bablokb-buttonbar"], rules=rules)
    assert len(described.networks) == 6
    # 10 k ±5 % pull-ups into 74HC14 inputs through an RC filter at 3.3 V (JESD7A, from memory)
    assert {n.verdict for n in described.networks} == {Verdict.PASS}
    assert all(n.network.inputs[0].series_ref for n in described.networks)
