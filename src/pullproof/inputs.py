"""The logic inputs of a pull network, resolved at their own supply.

For each input pin on a pulled net: the data that applies (family, part library, fields, or
the input class the rules' ``assume`` names, as an assumption), the part's I/O supply (the
rail on its power-input pins nearest the pin's bank; see :func:`pullproof.assume.io_supply`)
and the input's levels at every corner of that supply, each corner completed by the
assumptions in force. Also the input a ``[[net]]`` entry names on the far side of a
connector net.
"""

from __future__ import annotations

import fnmatch
import re
from dataclasses import fields, replace
from typing import TYPE_CHECKING

from .assume import io_supply
from .circuit import Part
from .errors import ValueParseError
from .families.loader import InputModel, load_families
from .network import Direction, InputLevels, InputOnNet, Missing, Rail
from .provenance import Origin, Provenance, Sourced, Status
from .topology import PinOnNet, PullSite
from .units import Q_, parse_resistance

if TYPE_CHECKING:
    from .detect import Resolver

__all__ = ["Inputs", "enabled_internal_pull"]


def _derived(value: object, where: str) -> Sourced:
    return Sourced(value, Provenance(Origin.DERIVED, where, Status.USER))


_PULL_RANGE = re.compile(
    r"^\s*(?:(?P<way>up|down)\s+)?(?P<lo>[^.\s]+)(?:\s*\.\.\s*(?P<hi>\S+))?\s*$", re.I
)


def enabled_internal_pull(part: Part) -> tuple[tuple[Sourced, Sourced], Direction] | None:
    """The internal pull the designer says firmware enables: field 'pullproof.internal_pull',
    written ``[up|down] MIN..MAX`` (or one value); a part library's range is only a capability.

    Raises:
        ValueParseError: the field cannot be read.
    """
    text = part.field("pullproof.internal_pull")
    if text is None or text.strip().lower() == "none":  # "none": the pin has no internal pull
        return None
    m = _PULL_RANGE.match(text)
    if m is None:
        raise ValueParseError(
            text, expected="[up|down] MIN..MAX, e.g. up 30k..50k, or none",
            field="pullproof.internal_pull", part=part.ref,
        )  # fmt: skip
    where = Provenance(Origin.FIELD, f"field 'pullproof.internal_pull' on {part.ref}", Status.USER)
    lo = parse_resistance(m.group("lo"), field="pullproof.internal_pull", part=part.ref)
    hi = parse_resistance(m.group("hi") or m.group("lo"), field="pullproof.internal_pull",
                          part=part.ref)  # fmt: skip
    way = Direction.DOWN if (m.group("way") or "up").lower() == "down" else Direction.UP
    return (Sourced(lo, where), Sourced(hi, where)), way


def _refix(levels: InputLevels, fix: str) -> InputLevels:
    """A corner whose assumed values say ``fix`` is where their real ones go."""
    changes = {}
    for f in fields(levels):
        v = getattr(levels, f.name)
        if isinstance(v, Sourced) and v.source.stands is not None:
            stands = replace(v.source.stands, fix=fix)
            changes[f.name] = Sourced(v.value, replace(v.source, stands=stands))
    return replace(levels, **changes)


class _LevelsMemo:
    """:meth:`InputModel.at` for one review: every input of one part type on one rail asks
    the same, and each answer costs many table lookups."""

    def __init__(self) -> None:
        self._found: dict[tuple[object, ...], tuple[InputModel, InputLevels]] = {}

    def __call__(self, model: InputModel, vdd: Sourced) -> InputLevels:
        key = model.at_key(vdd)
        found = self._found.get(key)
        if found is None:  # the model is kept with its levels: the key holds its family's id
            found = self._found[key] = (model, model.at(vdd))
        levels = found[1]
        # the supply's own source names the part it feeds: the corner carries the one asked
        return levels if levels.vdd is vdd else replace(levels, vdd=vdd)


class Inputs:
    """Resolve the inputs of one circuit's pull networks (a part of :class:`Resolver`)."""

    def __init__(self, resolver: Resolver) -> None:
        self.resolver = resolver
        self._at = _LevelsMemo()

    def supply_of(self, part: Part, pin: str) -> Rail | None:
        """The rail feeding ``pin``: the rail on the part's power-input pins, the one nearest
        the pin's bank where there are several (see :func:`pullproof.assume.io_supply`),
        with its voltage (stated, or assumed as for any rail)."""
        for spec in io_supply(self.resolver.circuit, part, pin, self.resolver.rail_of):
            rail = self.resolver.rail(spec.name)
            if rail is not None:
                return rail
        return None

    def input(self, pin: PinOnNet, rail: Rail) -> InputOnNet:
        info = self.resolver.infos[pin.ref]
        part = self.resolver.circuit.part(pin.ref)
        assert part is not None
        missing: list[Missing] = list(info.missing)
        series = None
        if pin.via:
            res = self.resolver.resistor_info(pin.via)
            series = res.ohms if res is not None else None
        model = info.inputs
        if model is not None and not any(
            fnmatch.fnmatchcase(pin.name.upper(), g.upper()) for g in info.input_pins
        ):
            model = None
            missing.append(
                Missing(
                    f"input data of {pin.ref} pin {pin.name}",
                    pin.ref,
                    "the part-library entry does not list this pin; add its name to 'pins'",
                )
            )
        family = info.family
        if model is None:
            model = self.resolver.assumer.class_model(part)
            if model is not None:  # judged with the input class instead (assumed)
                family, missing = f"{model.family.name} (assumed)", []
        if model is None:
            if not missing:
                missing.append(
                    Missing(
                        f"input data of {pin.ref} pin {pin.name}",
                        pin.ref,
                        "add field 'pullproof.family' (e.g. HC) or a part-library entry",
                    )
                )
            return InputOnNet(pin.ref, pin.pin, family, (), series_ohms=series,
                              series_ref=pin.via, missing=tuple(missing),
                              name=pin.name)  # fmt: skip
        if self._at_room_temperature():
            model = replace(model, room_temperature_only=True)
        pull = enabled_internal_pull(part)
        found = supply = self.supply_of(part, pin.pin)
        follows = None
        if (
            supply is not None
            and not rail.ground
            and not supply.same_supply(rail)
            and all(self.resolver.assumer.rails.class_ranged(r) for r in (supply, rail))
        ):
            # Two supplies whose voltages nothing states: judged as one (an assumption the
            # verdict lists), not as the worst pairing of two unknowns.
            follows, supply = self.resolver.assumer.rails.follows(supply, rail), rail
        return self._corners(
            InputOnNet(
                pin.ref,
                pin.pin,
                family,
                (),
                same_supply_as_pull=not rail.ground
                and (supply is None or supply.same_supply(rail)),
                series_ohms=series,
                series_ref=pin.via,
                internal_pull=pull[0] if pull else None,
                internal_pull_direction=pull[1] if pull else None,
                schmitt=model.schmitt,
                missing=tuple(missing),
                name=pin.name,
                supply="" if found is None else found.name,
                supply_assumed=follows,
            ),
            model,
            supply,
            rail,
        )

    def _corners(
        self, inp: InputOnNet, model: InputModel, supply: Rail | None, rail: Rail
    ) -> InputOnNet:
        """The input's levels at every corner of its own supply (and the table breakpoints
        inside it), each corner completed by the assumptions in force."""
        if supply is None:
            lo, hi = rail.v_min, rail.v_max
            note = f"assumed: {inp.ref} is powered from {rail.name} (no supply pin found)"
            if rail.ground:  # no supply drawn for a pulled-down input: its family's whole range
                lo, hi = model.supply_range
                note = f"assumed: {inp.ref} may run anywhere in its family's supply range"
                if model.family.supply == (0.0, 0.0):  # fields only: levels need no supply
                    note = f"{inp.ref}: levels from its fields, which need no supply"
            lo = Sourced(lo.value, Provenance(Origin.DERIVED, note, Status.USER))
            hi = Sourced(hi.value, Provenance(Origin.DERIVED, note, Status.USER))
        else:
            lo, hi = supply.v_min, supply.v_max
        v_lo, v_hi = lo.magnitude("V"), hi.magnitude("V")
        corners: list[InputLevels] = [self._at(model, lo)]
        for bp in model.breakpoints:
            if v_lo + 1e-9 < bp < v_hi - 1e-9:
                corners.append(self._at(model, _derived(Q_(bp, "V"), "family table breakpoint")))
        if v_hi > v_lo + 1e-12:
            corners.append(self._at(model, hi))
        label = inp.pin if inp.name in ("", inp.pin) else f"{inp.pin} ({inp.name})"
        other = not inp.same_supply_as_pull
        has = frozenset(
            f.name
            for f in fields(InputLevels)
            if any(getattr(c, f.name) is not None for c in corners)
        )
        done = tuple(self.resolver.assumer.complete(c, inp.ref, label, other, has) for c in corners)
        return replace(inp, corners=done)

    def _at_room_temperature(self) -> bool:
        """True when the rules' temperature span stays at 25 °C, where families state input
        currents of their own (JEDEC tables give 25 °C and over-temperature figures)."""
        lo: float = self.resolver.rules.get("temperature.min").magnitude("degC")
        hi: float = self.resolver.rules.get("temperature.max").magnitude("degC")
        return abs(lo - 25.0) < 1e-9 and abs(hi - 25.0) < 1e-9

    # ------------------------------------------------------------------ inputs off the sheet
    def offboard_input(self, net: str) -> tuple[InputModel, str] | None:
        """The input a ``[[net]]`` entry names for the far side of a net (a connector): a
        family (data) or an input class (assumed; none while assumptions are off)."""
        word = self.resolver.rules.for_net(net).input
        if not word:
            return None
        families = load_families()
        if word in families:
            return families[word].model(), word
        model = self.resolver.assumer.input_class(word)
        return None if model is None else (model, f"{word} (assumed, [[net]] entry)")

    def offboard(self, site: PullSite, rail: Rail) -> InputOnNet | None:
        """The far side's input, judged like any input, named after the connector it is
        reached through (or "off-schematic" when there is none)."""
        named = self.offboard_input(site.net.name)
        if named is None:
            return None
        model, family = named
        ref, pin = "off-schematic", ""
        if site.connectors:
            ref, pin = site.connectors[0].ref, site.connectors[0].pin
        supply_name = self.resolver.rules.for_net(site.net.name).input_supply
        supply = self.resolver.rail(supply_name) if supply_name else None
        inp = InputOnNet(
            ref, pin, family, (),
            same_supply_as_pull=not rail.ground and (supply is None or supply.same_supply(rail)),
            schmitt=model.schmitt, name=f"{pin} (far side)" if pin else "far side",
            supply=supply.name if supply is not None else "",
        )  # fmt: skip
        done = self._corners(inp, model, supply, rail)
        fix = f"the far side's family or numbers in the [[net]] entry for {site.net.name}"
        return replace(done, corners=tuple(_refix(c, fix) for c in done.corners))
