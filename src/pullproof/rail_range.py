"""Rails whose voltage nothing states: USB bus power, the range their parts accept.

Part of :mod:`pullproof.assume`: while assumptions are on, a rail named for USB bus power
gets the USB figures of the ``usb-bus`` rail class, and another rail whose name states no
voltage (and that the rules do not list) is judged, at both ends, over the supply range
every part it powers with known data accepts, or, when none has data, over the range of
the input class those parts are judged with. Each value is an assumption saying so.
"""

from __future__ import annotations

from dataclasses import replace
from typing import TYPE_CHECKING

from .families.match import PartKind
from .network import Rail
from .provenance import Origin, Provenance, Sourced, Stands, Status
from .supplies import usb_bus_name
from .units import Q_

if TYPE_CHECKING:
    from .assume import Assumer

# (imported late: pullproof.assume builds a RailStandIns and holds these helpers)

__all__ = ["CLASS_RANGE", "RailStandIns"]

#: The basis of a rail judged over the input class's supply range (nothing powered has data).
CLASS_RANGE = "rail range (input class)"


class RailStandIns:
    """The assumed voltage of rails nothing states, for one review."""

    def __init__(self, assumer: Assumer) -> None:
        from .assume import is_power, value_text

        self.a = assumer
        self._powered: dict[str, list[str]] | None = None
        self._text, self._is_power = value_text, is_power

    def usb(self, name: str) -> bool:
        """True for a rail named for USB bus power that the rules do not list."""
        bare = name.rsplit("/", 1)[-1]
        return self.a.enabled and bare not in self.a.rules.rails and usb_bus_name(bare)

    def usb_rail(self, name: str) -> Rail | None:
        cls = self.a.classes.rails.get("usb-bus")
        if cls is None:
            return None
        v = cls.values
        text = f"{self._text(v['min'])}–{self._text(v['max'])}, nominal {self._text(v['nominal'])}"
        fix = (
            f'[rails] {name} = {{ nominal = "{cls.numbers["nominal"].text}", min = '
            f'"{cls.numbers["min"].text}", max = "{cls.numbers["max"].text}" }} (your supply)'
        )
        tagged = [self._rail_value(v[k], name, text, "usb-bus", fix) for k in ("min", "max")]
        return Rail(name, tagged[0], tagged[1], self._rail_value(v["nominal"], name, text,
                                                                 "usb-bus", fix))  # fmt: skip

    def _rail_value(self, value: Sourced, name: str, text: str, basis: str, fix: str) -> Sourced:
        stands = Stands("", "", f"voltage of rail {name}", text, basis, fix)
        return Sourced(value.value, replace(value.source, stands=stands))

    def ranged_rail(self, name: str) -> Rail | None:
        """A rail of unknown voltage, judged over the supply range every part it powers with
        known data accepts. When none of them has data, the parts are judged with the input
        class, and the rail over the class's supply range. None: assumptions are off, the
        rail powers nothing, or its parts accept no common supply."""
        if not self.a.enabled:
            return None
        powered = self._powered_by().get(name, [])
        spans = []
        for ref in powered:
            model = self.a.infos[ref].inputs
            if model is None or model.family.supply == (0.0, 0.0):
                continue  # no data, or fields only (which state no supply range)
            lo, hi = model.supply_range
            if lo.source.origin is Origin.ASSUMED:
                continue  # an assumed range is no evidence of the rail's voltage
            spans.append((ref, self.a.infos[ref].family, lo, hi))
        why = "the supply range every part it powers with known data accepts"
        if not spans:
            judged = [
                r for r in powered
                if (p := self.a.circuit.part(r)) is not None and self.a.class_model(p) is not None
                and self.a.infos[r].kind in (PartKind.LOGIC, PartKind.MCU, PartKind.OTHER)
            ]  # fmt: skip
            stand_in = self.a.input_class()
            if not judged or stand_in is None:
                return None
            lo, hi = stand_in.supply_range
            spans = [(r, f"class {self.a.word}", lo, hi) for r in judged]
            why = (
                f"none of the parts it powers has data, so they are judged with input class "
                f"{self.a.word}, and the rail over that class's supply range"
            )
        v_lo = max(s[2].magnitude("V") for s in spans)
        v_hi = min(s[3].magnitude("V") for s in spans)
        if v_lo > v_hi:
            return None
        who = ", ".join(
            f"{ref} ({fam} {s_lo.magnitude('V'):g}–{s_hi.magnitude('V'):g} V)"
            for ref, fam, s_lo, s_hi in spans
        )
        status = min((s[2].source.status for s in spans), key=_STATUS_ORDER.index)
        nominal = (v_lo + v_hi) / 2
        text = f"{v_lo:g}–{v_hi:g} V"
        reason = (
            f"the name states no voltage and the rules do not list it: judged at both ends of "
            f"{text}, {why}: {who}"
        )
        fix = (
            f'[rails] {name} = {{ nominal = "{nominal:g}V", min = "{v_lo:g}V", max = '
            f'"{v_hi:g}V" }} (or the voltage the board uses)'
        )
        basis = "rail range" if why.startswith("the supply range") else CLASS_RANGE
        stands = Stands("", "", f"voltage of rail {name}", text, basis, fix)
        src = Provenance(Origin.ASSUMED, f"assumed voltage of rail {name}", status, reason, stands)
        return Rail(name, Sourced(Q_(v_lo, "V"), src), Sourced(Q_(v_hi, "V"), src),
                    Sourced(Q_(nominal, "V"), src))  # fmt: skip

    def follows(self, supply: Rail, rail: Rail) -> Sourced:
        """The assumption that ``supply`` (an input's, voltage unknown) runs at the pull
        rail's voltage: the value a verdict that judges them as one rests on."""
        fix = f'[rails] {supply.name} = {{ follows = "{rail.name}" }} (if it does)'
        stands = Stands("", "", f"voltage of rail {supply.name}", f"follows {rail.name}",
                        CLASS_RANGE, fix)  # fmt: skip
        reason = (
            f"the voltages of {supply.name} and {rail.name} are both unknown: judged as one "
            "supply rather than at the worst pairing of two unknowns"
        )
        src = Provenance(Origin.ASSUMED, f"assumed: {supply.name} follows {rail.name}",
                         Status.DEFAULT, reason, stands)  # fmt: skip
        return Sourced(rail.v_nom.value, src)

    @staticmethod
    def class_ranged(rail: Rail) -> bool:
        """True for a rail judged over the input class's range (its voltage is unknown)."""
        stands = rail.v_min.source.stands
        return stands is not None and stands.basis == CLASS_RANGE

    def _powered_by(self) -> dict[str, list[str]]:
        """Rail name → the parts with a power-input pin on it."""
        if self._powered is None:
            powered: dict[str, list[str]] = {}
            for part in self.a.circuit.parts:
                for p in part.pins:
                    if not self._is_power(p):
                        continue
                    net = self.a.circuit.net_of(part.ref, p.number)
                    spec = self.a.spec_of(net) if net is not None else None
                    if spec is not None and not spec.ground:
                        refs = powered.setdefault(spec.name, [])
                        if part.ref not in refs:
                            refs.append(part.ref)
            self._powered = powered
        return self._powered


_STATUS_ORDER = [
    Status.FROM_MEMORY, Status.DEFAULT, Status.COMMON_PRACTICE, Status.USER, Status.CONFIRMED,
]  # fmt: skip
