"""A pull network with every number resolved: the input of the constraint engine.

Detection (:mod:`pullproof.detect`) finds the topology and fills these records
from part fields, family data and rules; the constraints read only these records.
Every number is a :class:`~pullproof.provenance.Sourced` quantity. ``None`` means
"not known": a constraint that needs it reports itself incomplete and says which
value is missing and where to add it (see :class:`Missing`).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from enum import StrEnum

from .elements import Element
from .provenance import Sourced

__all__ = [
    "CapacitorOnNet",
    "Direction",
    "DriverOnNet",
    "InputLevels",
    "InputOnNet",
    "Missing",
    "NetworkRules",
    "PullNetwork",
    "PullResistor",
    "Rail",
    "SwitchOnNet",
]


class Direction(StrEnum):
    UP = "up"
    DOWN = "down"


@dataclass(frozen=True)
class Missing:
    """A value a check needed and did not find: what, for which part, and where to add it."""

    what: str  # "V_IH,min of U2 pin 3"
    ref: str  # the part (or "" for a rules value)
    hint: str  # "add field 'pullproof.family' (e.g. 74HC) or a part-library entry"


@dataclass(frozen=True)
class Rail:
    """A supply rail or ground: its name and voltage range (ground: 0 V both)."""

    name: str
    v_min: Sourced
    v_max: Sourced
    v_nom: Sourced
    ground: bool = False
    ac: bool = False  # an AC rail: the voltages are rms


@dataclass(frozen=True)
class PullResistor:
    """One fitted pull resistor (parallel pulls are combined by detection into one record
    with ``refs`` listing them all).

    ``refs`` name the resistors as reports do (``R3``, ``RN1 (1–8)`` for an element of a
    resistor array); ``elements`` holds the same resistors as parts and pins, in order
    (empty when every entry of ``refs`` is a plain two-pin resistor's reference).
    """

    refs: tuple[str, ...]
    ohms: Sourced  # nominal resistance (combined when parallel)
    tolerance: Sourced  # fraction, e.g. 0.05
    tcr: Sourced  # per kelvin, e.g. 100e-6 / K, as a quantity in 1/K
    power_rating: Sourced | None  # W at the rating temperature
    working_voltage: Sourced | None  # V, the package's limiting element voltage
    size: str = ""  # package size code, e.g. "0603", when known
    elements: tuple[Element, ...] = ()

    @property
    def members(self) -> tuple[Element, ...]:
        """Each resistor as a part reference plus pins (plain resistors: pins 1 and 2)."""
        return self.elements or tuple(Element(r, ("1", "2")) for r in self.refs)


@dataclass(frozen=True)
class InputLevels:
    """A logic input's guaranteed levels and currents at one supply voltage of its own.

    Sign convention for currents (documented in the README): ``i_high`` is the
    largest current flowing *into* the pin while it is held high (leakage, TTL
    IIH); ``i_low`` the largest current flowing *out of* the pin while it is held
    low (TTL IIL; CMOS leakage). Both are stored as non-negative magnitudes.
    """

    vdd: Sourced
    vih_min: Sourced | None
    vil_max: Sourced | None
    i_high: Sourced | None
    i_low: Sourced | None
    v_in_max: Sourced | None = None  # highest voltage the pin tolerates at this supply
    c_in: Sourced | None = None
    vt_plus_min: Sourced | None = None  # Schmitt positive-going threshold, lowest guaranteed
    vt_plus_max: Sourced | None = None
    vt_minus_min: Sourced | None = None
    vt_minus_max: Sourced | None = None
    max_transition: Sourced | None = None  # longest allowed input rise/fall (non-Schmitt)


@dataclass(frozen=True)
class InputOnNet:
    """A logic input on the pulled net.

    ``corners`` holds the levels at every supply corner and table breakpoint of
    the input's own supply (worst case is taken over all of them).
    ``same_supply_as_pull`` is true when the input is powered from the pull rail,
    so the two move together.
    """

    ref: str
    pin: str
    family: str  # family or part-library name; "" when unknown
    corners: tuple[InputLevels, ...]
    same_supply_as_pull: bool = True
    series_ohms: Sourced | None = None  # a series resistor between the net and this pin
    series_ref: str = ""
    internal_pull: tuple[Sourced, Sourced] | None = (
        None  # (min, max) ohms of an enabled internal pull
    )
    internal_pull_direction: Direction | None = None
    schmitt: bool = False
    missing: tuple[Missing, ...] = ()


@dataclass(frozen=True)
class SwitchOnNet:
    """A two-terminal contact (button, reed, relay contact) on the net.

    ``other_side`` names where the contact's far side goes ("GND", "+5V", or a net name).
    ``pulls_against`` is true when closing it drives the line opposite to the pull.
    """

    ref: str
    other_side: str
    pulls_against: bool
    contact_max: Sourced | None  # A, largest current the contact is rated for
    wetting_min: Sourced | None  # A, the least current that keeps the contact clean
    bounce_time: Sourced | None = None  # s


@dataclass(frozen=True)
class DriverOnNet:
    """An open-drain/open-collector output, optocoupler or transistor pulling against the pull."""

    ref: str
    pin: str
    kind: str  # "open-drain", "open-collector", "optocoupler", "transistor"
    i_ol: Sourced | None  # A, guaranteed sink current at v_ol
    v_ol: Sourced | None  # V, output low voltage at i_ol
    i_off: Sourced | None  # A, off-state leakage (or opto dark current)
    # optocoupler output side
    ctr_min: Sourced | None = None  # fraction
    ageing: Sourced | None = None  # fraction of initial CTR left at end of life
    i_f_min: Sourced | None = None  # A, least LED forward current when on
    vce_sat: Sourced | None = None


@dataclass(frozen=True)
class CapacitorOnNet:
    ref: str
    farads: Sourced
    to: str  # where the other side goes


@dataclass(frozen=True)
class NetworkRules:
    """The project rules that apply to this network, each with its provenance."""

    margin: Sourced  # V, noise margin kept from each threshold
    derating: Sourced  # fraction of rated power allowed
    temp_min: Sourced  # degC
    temp_max: Sourced  # degC
    temp_ref: Sourced  # degC, temperature at which nominal/tolerance are specified (25 degC)
    series: str  # preferred E-series, "E24"
    policy: str  # "centre" or "low-current"
    preferred_min: Sourced | None = None  # ohms (soft)
    preferred_max: Sourced | None = None  # ohms (soft)
    current_budget: Sourced | None = None  # A, largest allowed static current through the pull
    bounce_time: Sourced | None = None  # s
    edge_time_max: Sourced | None = None  # s, slowest allowed edge through the undefined band
    i2c_mode: str = ""  # "", "standard", "fast", "fast-plus" when the net is an I2C line
    bus_capacitance: Sourced | None = None  # F, an I2C bus: pins and wiring together
    wiring_capacitance: Sourced | None = None  # F, wiring or cable on any net (rules)
    # ratio: a band closer than this to a binding hard edge is "marginal" (evaluate: 10 %)
    margin_ratio: Sourced | None = None


@dataclass(frozen=True)
class PullNetwork:
    """One pulled signal net, resolved and ready to judge."""

    net: str
    sheet: str
    direction: Direction
    rail: Rail  # the rail the pull goes to
    resistor: PullResistor
    inputs: tuple[InputOnNet, ...]
    rules: NetworkRules
    switches: tuple[SwitchOnNet, ...] = ()
    drivers: tuple[DriverOnNet, ...] = ()
    capacitors: tuple[CapacitorOnNet, ...] = ()
    opposite_rail: Rail | None = None  # the rail a switch/driver pulls toward (usually ground)
    mains_adjacent: bool = False  # next to mains or other hazardous voltage (see hazard.py)
    mains_reason: str = ""
    missing: tuple[Missing, ...] = ()
    notes: tuple[str, ...] = field(default_factory=tuple)
