"""Hand-made ReviewResult objects for report tests (invented scenarios, not real designs).

The numbers follow the worst-case formulas of DESIGN.md with family values as
REFERENCES.md gives them; the status of each family number is carried into its
provenance (JESD7A levels from memory, 74/74LS TTL limits confirmed in educational
tables, JESD8C levels from memory). The factory is for rendering tests: it fixes
what a report receives, not what the engine computes.
"""

from __future__ import annotations

from dataclasses import replace

from pullproof.network import (
    CapacitorOnNet,
    Direction,
    DriverOnNet,
    InputLevels,
    InputOnNet,
    Missing,
    NetworkRules,
    PullNetwork,
    PullResistor,
    Rail,
    SwitchOnNet,
)
from pullproof.operating import operating_point, operating_points
from pullproof.provenance import Origin, Provenance, Sourced, Status
from pullproof.results import (
    Bound,
    BoundKind,
    Check,
    Finding,
    NetworkResult,
    Recommendation,
    ReviewResult,
    Skipped,
    Term,
    Verdict,
)
from pullproof.units import Q_, ureg

# IEC 60063 E24 mantissas (REFERENCES.md §1, confirmed), for the candidate lists below.
E24 = (
    10,
    11,
    12,
    13,
    15,
    16,
    18,
    20,
    22,
    24,
    27,
    30,
    33,
    36,
    39,
    43,
    47,
    51,
    56,
    62,
    68,
    75,
    82,
    91,
)
DT = 60.0  # K, 85 °C against the 25 °C reference (rules below)


def s(
    value: float,
    unit: str,
    where: str,
    status: Status = Status.USER,
    *,
    origin: Origin = Origin.FIELD,
    reason: str = "",
) -> Sourced:
    """A sourced quantity in one line."""
    q = Q_(value, ureg.degC) if unit == "degC" else Q_(value, unit)
    return Sourced(q, Provenance(origin, where, status, reason))


def fam(value: float, unit: str, where: str, status: Status = Status.FROM_MEMORY) -> Sourced:
    return s(
        value,
        unit,
        where,
        status,
        origin=Origin.FAMILY,
        reason="confirm against the datasheet of the part you fit",
    )


def rule(value: float, unit: str, key: str, default: bool = True) -> Sourced:
    if default:
        return s(
            value,
            unit,
            f"default {key}",
            Status.DEFAULT,
            origin=Origin.DEFAULT,
            reason="built-in default; set it in the rules file",
        )
    return s(value, unit, f"rules key {key} (greenhouse.toml:3)", origin=Origin.RULES)


def band(ohms: float, tol: float, tcr: float = 100e-6) -> tuple[float, float]:
    """R_lo = R(1−tol)(1−TCR·ΔT), R_hi = R(1+tol)(1+TCR·ΔT) (DESIGN.md)."""
    return ohms * (1 - tol) * (1 - tcr * DT), ohms * (1 + tol) * (1 + tcr * DT)


def fitting(lo: float, hi: float, tol: float) -> tuple[float, ...]:
    """E24 values whose whole band lies inside [lo, hi]."""
    out = []
    for decade in range(0, 7):
        for m in E24:
            r = m * 10.0**decade / 10
            b = band(r, tol)
            if b[0] >= lo and b[1] <= hi:
                out.append(r)
    return tuple(out)


def rails() -> dict[str, Rail]:
    v5 = 'rail +5V (rules key rails."+5V", greenhouse.toml:8)'
    v33 = "rail +3V3 (default ±5 % for a named rail)"
    return {
        "+5V": Rail(
            "+5V",
            s(4.75, "V", v5, origin=Origin.RULES),
            s(5.25, "V", v5, origin=Origin.RULES),
            s(5.0, "V", "power symbol +5V", origin=Origin.SCHEMATIC),
        ),
        "+3V3": Rail(
            "+3V3",
            s(3.135, "V", v33, Status.DEFAULT, origin=Origin.DEFAULT),
            s(3.465, "V", v33, Status.DEFAULT, origin=Origin.DEFAULT),
            s(3.3, "V", "power symbol +3V3", origin=Origin.SCHEMATIC),
        ),
        "GND": Rail(
            "GND",
            s(0, "V", "ground symbol GND", origin=Origin.SCHEMATIC),
            s(0, "V", "ground symbol GND", origin=Origin.SCHEMATIC),
            s(0, "V", "ground symbol GND", origin=Origin.SCHEMATIC),
            ground=True,
        ),
    }


def net_rules(**kw: object) -> NetworkRules:
    base = NetworkRules(
        margin=rule(0.1, "V", "margin"),
        derating=rule(0.5, "", "derating"),
        temp_min=rule(-40, "degC", "temperature.min"),
        temp_max=rule(85, "degC", "temperature.max"),
        temp_ref=rule(25, "degC", "temperature.reference"),
        series="E24",
        policy="centre",
        preferred_min=rule(1000, "ohm", "preferred.min"),
        preferred_max=rule(100000, "ohm", "preferred.max"),
    )
    return replace(base, **kw)  # type: ignore[arg-type]


def resistor(
    ref: str, ohms: float, tol: float, size: str = "0603", power: float = 0.1, wv: float = 50
) -> PullResistor:
    return PullResistor(
        refs=(ref,),
        ohms=s(ohms, "ohm", f"field 'Value' on {ref}", origin=Origin.VALUE),
        tolerance=s(tol, "", f"field 'Tolerance' on {ref}"),
        tcr=s(
            100e-6,
            "1/K",
            "default resistor.tcr",
            Status.DEFAULT,
            origin=Origin.DEFAULT,
            reason="thick-film chip resistors are commonly 100 ppm/K",
        ),
        power_rating=s(
            power,
            "W",
            f"size {size} (generic thick-film table)",
            Status.COMMON_PRACTICE,
            origin=Origin.DEFAULT,
        ),
        working_voltage=s(
            wv,
            "V",
            f"size {size} (generic thick-film table)",
            Status.COMMON_PRACTICE,
            origin=Origin.DEFAULT,
        ),
        size=size,
    )


def one_corner(
    ref: str, pin: str, family: str, *levels: Sourced | None, **kw: object
) -> InputOnNet:
    """An input with a single supply corner: (vdd, vih_min, vil_max, i_high, i_low)."""
    return InputOnNet(ref, pin, family, (InputLevels(*levels),), **kw)  # type: ignore[arg-type]


def hc_input(ref: str, pin: str) -> InputOnNet:
    std = "family 74HC, JEDEC JESD7A"
    return InputOnNet(
        ref,
        pin,
        "74HC",
        (
            InputLevels(
                vdd=s(4.5, "V", f"supply corner of {ref}", origin=Origin.DERIVED),
                vih_min=fam(3.15, "V", std),
                vil_max=fam(1.35, "V", std),
                i_high=fam(1e-6, "A", std),
                i_low=fam(1e-6, "A", std),
                v_in_max=fam(5.75, "V", std),
            ),
        ),
    )


def bound(
    cid: str,
    title: str,
    kind: BoundKind,
    ohms: float | None,
    formula: str,
    subst: str,
    terms: tuple[Term, ...],
    *,
    hard: bool = True,
    source: str = "circuit theory",
    relax: str = "",
    missing: tuple[Missing, ...] = (),
) -> Bound:
    return Bound(
        cid,
        title,
        kind,
        ohms,
        hard,
        formula,
        subst,
        terms,
        source=source,
        explanation=f"{title} on this net.",
        relax=relax,
        corner="VCC at its minimum, 85 °C",
        missing=missing,
    )


def power_bound(n: PullNetwork, vmax: Sourced) -> Bound:
    p = n.resistor.power_rating
    assert p is not None
    v, w, d = vmax.magnitude("V"), p.magnitude("W"), n.rules.derating.magnitude("")
    return bound(
        "resistor-power",
        "Resistor power while pulled",
        BoundKind.MIN,
        v * v / (w * d),
        "R_lo ≥ V_max² / (P_rated · derating)",
        f"({v:g} V)² / ({w:g} W · {d:g})",
        (Term("V_max", vmax), Term("P_rated", p), Term("derating", n.rules.derating)),
        source="Joule's law; derating per common practice",
        relax="a larger resistor package with a higher power rating",
    )


def preferred(n: PullNetwork) -> tuple[Bound, Bound]:
    lo, hi = n.rules.preferred_min, n.rules.preferred_max
    assert lo is not None and hi is not None
    return (
        bound(
            "preferred-range",
            "Preferred range (low end)",
            BoundKind.MIN,
            lo.magnitude("ohm"),
            "R_lo ≥ R_pref,min",
            f"{lo.magnitude('ohm'):g} Ω",
            (Term("R_pref,min", lo),),
            hard=False,
            source="project rules",
        ),
        bound(
            "preferred-range",
            "Preferred range (high end)",
            BoundKind.MAX,
            hi.magnitude("ohm"),
            "R_hi ≤ R_pref,max",
            f"{hi.magnitude('ohm'):g} Ω",
            (Term("R_pref,max", hi),),
            hard=False,
            source="project rules",
        ),
    )


def high_level(n: PullNetwork, inp: InputOnNet, extra: tuple[Term, ...] = ()) -> Bound:
    lv = inp.corners[0]
    assert lv.vih_min is not None and lv.i_high is not None
    vmin, vih, m = (
        n.rail.v_min.magnitude("V"),
        lv.vih_min.magnitude("V"),
        n.rules.margin.magnitude("V"),
    )
    i = lv.i_high.magnitude("A") + sum(t.value.magnitude("A") for t in extra)
    return bound(
        "high-level-holds",
        "High level holds",
        BoundKind.MAX,
        (vmin - vih - m) / i,
        "R_hi ≤ (V_min − V_IH,min − m) / ΣI_high",
        f"({vmin:g} V − {vih:g} V − {m:g} V) / {i * 1e6:g} µA",
        (
            Term("V_min", n.rail.v_min),
            Term("V_IH,min", lv.vih_min),
            Term("m", n.rules.margin),
            Term("I_high", lv.i_high),
            *extra,
        ),
        source="Ohm's law on the input-high current; levels per the input's family standard",
        relax="fewer inputs on the net or inputs with lower leakage",
    )


def finish(
    n: PullNetwork,
    bounds: tuple[Bound, ...],
    checks: tuple[Check, ...] = (),
    *,
    verdict: Verdict,
    reason: str,
    advice: tuple[str, ...] = (),
    pick: float | None = None,
    policy_reason: str = "",
    missing: tuple[Missing, ...] = (),
) -> NetworkResult:
    """Window, band, margins and recommendation from the hand-made bounds."""
    hard = [b for b in bounds if b.hard and b.ohms is not None]
    mins = [b for b in hard if b.kind is BoundKind.MIN]
    maxs = [b for b in hard if b.kind is BoundKind.MAX]
    lo_b = max(mins, key=lambda b: b.ohms or 0.0, default=None)
    hi_b = min(maxs, key=lambda b: b.ohms or 0.0, default=None)
    window = (lo_b.ohms if lo_b else None, hi_b.ohms if hi_b else None)
    tol = n.resistor.tolerance.magnitude("")
    b = band(n.resistor.ohms.magnitude("ohm"), tol)
    margins = (
        b[0] / window[0] - 1 if window[0] else None,
        window[1] / b[1] - 1 if window[1] else None,
    )
    binding = tuple(x.constraint for x in (lo_b, hi_b) if x is not None)
    rec = None
    if window[0] is not None and window[1] is not None and verdict is not Verdict.INCOMPLETE:
        cands = fitting(window[0], window[1], tol) if window[0] < window[1] else ()
        rec = Recommendation(
            "E24",
            tol,
            cands,
            pick if cands else None,
            "centre",
            policy_reason or "no E24 value fits the window",
            operating_points(n, cands),
        )
    return NetworkResult(
        n, bounds, window, b, verdict, reason, margins, binding, rec, checks, advice, missing,
        operating_point(n),
    )  # fmt: skip


def net_pass() -> NetworkResult:
    """Greenhouse controller: vent limit switch on a 74HC input, pulled up to +5 V."""
    r = rails()
    sw = SwitchOnNet(
        "SW3",
        "GND",
        True,
        s(0.05, "A", "field 'Contact' on SW3"),
        s(
            1e-4,
            "A",
            "default switch.wetting (gold contacts)",
            Status.FROM_MEMORY,
            origin=Origin.DEFAULT,
        ),
    )
    n = PullNetwork(
        "/vents/VENT_LIMIT",
        "/vents/",
        Direction.UP,
        r["+5V"],
        resistor("R12", 10e3, 0.05),
        (hc_input("U4", "3"),),
        net_rules(),
        switches=(sw,),
        capacitors=(
            CapacitorOnNet("C9", s(100e-9, "F", "field 'Value' on C9", origin=Origin.VALUE), "GND"),
        ),
        opposite_rail=r["GND"],
    )
    vmax, vmin = r["+5V"].v_max, r["+5V"].v_min
    assert sw.contact_max is not None and sw.wetting_min is not None
    bounds = (
        high_level(n, n.inputs[0]),
        power_bound(n, vmax),
        bound(
            "contact-rating",
            "Switch contact rating",
            BoundKind.MIN,
            5.25 / 0.05,
            "R_lo ≥ V_max / I_contact,max",
            "5.25 V / 50 mA",
            (Term("V_max", vmax), Term("I_contact,max", sw.contact_max)),
            source="Ohm's law",
        ),
        bound(
            "contact-wetting",
            "Contact wetting current",
            BoundKind.MAX,
            4.75 / 1e-4,
            "R_hi ≤ V_min / I_wet,min",
            "4.75 V / 100 µA",
            (Term("V_min", vmin), Term("I_wet,min", sw.wetting_min)),
            source="Ohm's law; wetting current per common practice",
            relax="gold-plated contacts with a lower wetting current",
        ),
        *preferred(n),
    )
    checks = (
        Check(
            "input-tolerance",
            "Input tolerates the pull rail",
            True,
            True,
            "V_max ≤ V_in,max",
            "5.25 V ≤ 5.75 V",
            (Term("V_max", vmax), Term("V_in,max", n.inputs[0].corners[0].v_in_max)),  # type: ignore[arg-type]
            source="absolute maximum rating of the input",
        ),
    )
    return finish(
        n,
        bounds,
        checks,
        verdict=Verdict.PASS,
        reason="The whole 9.4 kΩ … 10.6 kΩ band sits inside the window.",
        pick=5100.0,
        policy_reason="closest to the geometric centre of the window (5.12 kΩ)",
    )


def net_marginal() -> NetworkResult:
    """Aquarium doser: float switch on a 3.3 V input with a very large pull-up."""
    r = rails()
    std = "family LVCMOS33, JEDEC JESD8C.01"
    inp = one_corner(
        "U1",
        "12",
        "LVCMOS33",
        s(3.0, "V", "supply corner of U1", origin=Origin.DERIVED),
        fam(2.0, "V", std),
        fam(0.8, "V", std),
        s(1e-6, "A", "part library doser_parts.toml: U1", origin=Origin.PART_LIBRARY),
        s(1e-6, "A", "part library doser_parts.toml: U1", origin=Origin.PART_LIBRARY),
    )
    n = PullNetwork(
        "/FLOAT_HI",
        "/",
        Direction.UP,
        r["+3V3"],
        resistor("R7", 220e3, 0.01, size="0402", power=0.0625),
        (inp,),
        net_rules(),
        switches=(SwitchOnNet("SW1", "GND", True, None, None),),
        opposite_rail=r["GND"],
    )
    bounds = (high_level(n, inp), power_bound(n, r["+3V3"].v_max), *preferred(n))
    return finish(
        n,
        bounds,
        verdict=Verdict.MARGINAL,
        reason=(
            "Hard limits met, but the band top 224 kΩ is above the preferred maximum 100 kΩ (soft)."
        ),
        pick=100e3,
        policy_reason="the largest candidate inside the preferred range keeps the current low",
    )


def net_fail() -> NetworkResult:
    """Workshop interlock panel: guard switch pulled down on a standard-TTL input."""
    r = rails()
    std = "family 74 (standard TTL), educational TTL tables"
    inp = one_corner(
        "U8",
        "1",
        "74",
        s(4.75, "V", "supply corner of U8", origin=Origin.DERIVED),
        fam(2.0, "V", std, Status.CONFIRMED),
        fam(0.8, "V", std, Status.CONFIRMED),
        fam(40e-6, "A", std, Status.CONFIRMED),
        fam(1.6e-3, "A", std, Status.CONFIRMED),
    )
    n = PullNetwork(
        "/GUARD_CLOSED",
        "/",
        Direction.DOWN,
        r["GND"],
        resistor("R21", 1e3, 0.05, size="0402", power=0.0625),
        (inp,),
        net_rules(),
        switches=(SwitchOnNet("SW5", "+5V", True, None, None),),
        opposite_rail=r["+5V"],
    )
    lv = inp.corners[0]
    assert lv.vil_max is not None and lv.i_low is not None
    bounds = (
        bound(
            "low-level-holds",
            "Low level holds",
            BoundKind.MAX,
            (0.8 - 0.1) / 1.6e-3,
            "R_hi ≤ (V_IL,max − m) / ΣI_low",
            "(0.8 V − 0.1 V) / 1.6 mA",
            (Term("V_IL,max", lv.vil_max), Term("m", n.rules.margin), Term("I_low", lv.i_low)),
            source="Ohm's law on the input-low current; TTL inputs source current",
            relax="a CMOS input (74HCT) draws microamps, so the limit rises far above 1 kΩ",
        ),
        power_bound(n, r["+5V"].v_max),
        *preferred(n),
    )
    advice = (
        "Low level holds (max 438 Ω): a CMOS input such as 74HCT draws microamps instead of "
        "1.6 mA, which lifts this limit into the megohms.",
        "Resistor power while pulled (min 882 Ω): an 0805 part at 1/8 W halves this limit "
        "to 441 Ω.",
    )
    return finish(
        n,
        bounds,
        verdict=Verdict.FAIL,
        reason="The window is empty: low level holds (438 Ω) is below resistor power (882 Ω).",
        advice=advice,
    )


def net_incomplete() -> NetworkResult:
    """Beehive scale: load-cell converter ready line, the input's family is unknown."""
    r = rails()
    miss = (
        Missing(
            "V_IH,min of U5 pin 2",
            "U5",
            "add field 'pullproof.family' (e.g. 74HC) or a part-library entry",
        ),
        Missing(
            "I_high of U5 pin 2",
            "U5",
            "add field 'pullproof.family' (e.g. 74HC) or a part-library entry",
        ),
    )
    inp = one_corner(
        "U5",
        "2",
        "",
        s(3.3, "V", "supply of U5", origin=Origin.SCHEMATIC),
        None,
        None,
        None,
        None,
        missing=miss,
    )
    n = PullNetwork(
        "/scale/HX_DOUT",
        "/scale/",
        Direction.UP,
        r["+3V3"],
        resistor("R30", 100e3, 0.01),
        (inp,),
        net_rules(),
        missing=miss,
    )
    bounds = (
        bound(
            "high-level-holds",
            "High level holds",
            BoundKind.MAX,
            None,
            "R_hi ≤ (V_min − V_IH,min − m) / ΣI_high",
            "(3.135 V − ? − 0.1 V) / ?",
            (Term("V_min", r["+3V3"].v_min), Term("m", n.rules.margin)),
            missing=miss,
        ),
        power_bound(n, r["+3V3"].v_max),
        *preferred(n),
    )
    return finish(
        n,
        bounds,
        verdict=Verdict.INCOMPLETE,
        reason="The input levels of U5 are unknown, so the upper limit cannot be computed.",
        missing=miss,
    )


def net_mains() -> NetworkResult:
    """Greenhouse controller: zero-cross optocoupler output pulled up to 3.3 V."""
    r = rails()
    std = "family LVCMOS33, JEDEC JESD8C.01"
    inp = one_corner(
        "U1",
        "7",
        "LVCMOS33",
        s(3.0, "V", "supply corner of U1", origin=Origin.DERIVED),
        fam(2.0, "V", std),
        fam(0.8, "V", std),
        s(1e-6, "A", "field 'pullproof.i_high' on U1"),
        s(1e-6, "A", "field 'pullproof.i_low' on U1"),
        schmitt=True,
    )
    opto = DriverOnNet(
        "U7",
        "4",
        "optocoupler",
        None,
        None,
        s(1e-7, "A", "field 'pullproof.i_dark' on U7"),
        ctr_min=s(0.5, "", "field 'pullproof.ctr_min' on U7"),
        ageing=s(
            0.5,
            "",
            "default opto.ageing",
            Status.COMMON_PRACTICE,
            origin=Origin.DEFAULT,
            reason="CTR commonly falls 30–50 % over life",
        ),
        i_f_min=s(2e-3, "mA", "field 'pullproof.if_min' on U7"),
        vce_sat=s(0.4, "V", "field 'pullproof.vce_sat' on U7"),
    )
    n = PullNetwork(
        "/ZC_SENSE",
        "/",
        Direction.UP,
        r["+3V3"],
        resistor("R40", 10e3, 0.05),
        (inp,),
        net_rules(),
        drivers=(opto,),
        opposite_rail=r["GND"],
        mains_adjacent=True,
        mains_reason="U7 has pins on /AC_N (mains pattern 'AC_*') and on /ZC_SENSE",
    )
    assert opto.i_off is not None and opto.ctr_min and opto.ageing and opto.i_f_min and opto.vce_sat
    vmax = r["+3V3"].v_max
    bounds = (
        high_level(n, inp, (Term("I_dark", opto.i_off),)),
        power_bound(n, vmax),
        bound(
            "optocoupler-output",
            "Optocoupler pulls the line low",
            BoundKind.MIN,
            (3.465 - 0.4) / (0.5 * 0.5 * 2e-3 - 1e-6),
            "R_lo ≥ (V_max − V_CE(sat)) / (CTR_min · ageing · I_F,min − ΣI_low)",
            "(3.465 V − 0.4 V) / (0.5 · 0.5 · 2 mA − 1 µA)",
            (
                Term("V_max", vmax),
                Term("V_CE(sat)", opto.vce_sat),
                Term("CTR_min", opto.ctr_min),
                Term("ageing", opto.ageing),
                Term("I_F,min", opto.i_f_min),
                Term("I_low", inp.corners[0].i_low),
            ),  # type: ignore[arg-type]
            source="transistor saturation with end-of-life CTR; ageing per common practice",
            relax="more LED current or a higher-CTR optocoupler",
        ),
        *preferred(n),
    )
    wv = n.resistor.working_voltage
    assert wv is not None
    checks = (
        Check(
            "working-voltage",
            "Resistor working voltage",
            True,
            True,
            "V_peak ≤ V_working",
            "3.465 V ≤ 50 V",
            (Term("V_peak", vmax), Term("V_working", wv)),
            source="resistor rating (IEC 60115 convention)",
        ),
    )
    return finish(
        n,
        bounds,
        checks,
        verdict=Verdict.PASS,
        reason="The whole 9.4 kΩ … 10.6 kΩ band sits inside the window.",
        pick=68e3,
        policy_reason="closest to the geometric centre of the window",
    )


def findings() -> tuple[Finding, ...]:
    return (
        Finding(
            "floating-input",
            Verdict.FAIL,
            "/SPARE_KEY",
            ("SW9", "U4"),
            "U4 pin 9 is driven only by SW9 and has no pull: it floats while the contact is open.",
        ),
        Finding(
            "up-and-down",
            Verdict.MARGINAL,
            "/MODE_SEL",
            ("R17", "R18"),
            "Both a pull-up (R17) and a pull-down (R18) sit on this net: it is a divider, "
            "check the level it sets.",
        ),
    )


def skipped() -> tuple[Skipped, ...]:
    return (
        Skipped("R9", "/LED_RUN", "LED series resistor: the net reaches only a diode"),
        Skipped("R15", "/VBAT_SENSE", "divider into an analog input"),
    )


def sample_result(
    networks: int | None = None,
    *,
    files: tuple[tuple[str, str], ...] = (),
    rules_file: str | None = None,
) -> ReviewResult:
    """The five-network greenhouse/doser/interlock/beehive sample (first ``networks`` of them)."""
    nets = (net_pass(), net_fail(), net_marginal(), net_incomplete(), net_mains())
    if networks is not None:
        nets = nets[:networks]
    return ReviewResult(
        "greenhouse.kicad_sch", nets, findings(), skipped(), files=files, rules_file=rules_file
    )


HOSTILE = "<script>alert(1)</script>"
HOSTILE_VALUE = '"&<>'


def hostile_result() -> ReviewResult:
    """Markup in every schematic-sourced string: net, refs, values, provenance, findings."""
    base = net_pass()
    n = base.network
    res = replace(
        n.resistor,
        refs=(f"R{HOSTILE_VALUE}",),
        ohms=s(10e3, "ohm", f"field 'Value' on R{HOSTILE_VALUE}"),
    )
    inp = replace(n.inputs[0], ref=f"U{HOSTILE_VALUE}", family=f"<b>{HOSTILE_VALUE}</b>")
    net = replace(
        n,
        net=HOSTILE,
        sheet=f"/{HOSTILE_VALUE}/",
        resistor=res,
        inputs=(inp,),
        mains_reason=HOSTILE,
    )
    bounds = tuple(
        replace(
            b, terms=tuple(replace(t, value=s(1, "V", f"field {HOSTILE} on X")) for t in b.terms)
        )
        for b in base.bounds
    )
    nr = replace(base, network=net, bounds=bounds, reason=f"reason {HOSTILE}")
    f = Finding("floating-input", Verdict.FAIL, HOSTILE, (HOSTILE_VALUE,), f"message {HOSTILE}")
    return ReviewResult(
        f"{HOSTILE_VALUE}.kicad_sch",
        (nr,),
        (f,),
        (Skipped(HOSTILE_VALUE, HOSTILE, HOSTILE),),
        files=(),
        rules_file=None,
    )
