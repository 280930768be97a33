"""Input tolerance: the pull rail must not exceed what each input accepts.

V_max of the pull rail ≤ V_in,max of every input. An input powered from the
pull rail is compared corner by corner (its limit moves with its supply); an
input on another supply is compared at the lowest limit over its corners. An
input powered from the pull rail with no stated limit passes: the rail is its
own supply, which every logic input accepts.
"""

from __future__ import annotations

from ..network import Direction, InputOnNet, Missing, PullNetwork
from ..results import Bound, Check, Term
from ._common import fmt, supply_cases

__all__ = ["input_tolerance"]

_FORMULA = "V_max ≤ V_in,max"
_SOURCE = "the input's absolute input-voltage limit"


def input_tolerance(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """One Check per input on a pull-up net (a pull-down holds the line at ground)."""
    if network.direction is not Direction.UP:
        return ()
    return tuple(_check(network, inp) for inp in network.inputs)


def _check(network: PullNetwork, inp: InputOnNet) -> Check:
    why = f"The pull-up lifts {inp.ref} pin {inp.pin} to the rail; the pin must tolerate it."
    title = "Input tolerates the pull rail"
    cases = supply_cases(network, inp, rail_low=False)
    if any(lv.v_in_max is None for _, lv, _ in cases) or not cases:
        if inp.same_supply_as_pull:
            return Check(
                "input-tolerance",
                title,
                True,
                True,
                _FORMULA,
                f"{inp.ref} is powered from {network.rail.name}",
                (),
                _SOURCE,
                why,
                sentence=f"{inp.ref} is powered from {network.rail.name}, the pull rail itself",
            )
        return Check(
            "input-tolerance",
            title,
            None,
            True,
            _FORMULA,
            "",
            (),
            _SOURCE,
            why,
            (
                Missing(
                    f"V_in,max of {inp.ref} pin {inp.pin}",
                    inp.ref,
                    "add the input's maximum input voltage to its family or part-library entry",
                ),
            ),
            sentence=f"the highest voltage {inp.ref} pin {inp.pin} tolerates is unknown",
        )
    v, lv, _ = min(cases, key=lambda c: c[1].v_in_max.magnitude("V") - c[0].magnitude("V"))  # type: ignore[union-attr]
    assert lv.v_in_max is not None
    ok = v.magnitude("V") <= lv.v_in_max.magnitude("V")
    rail, limit = fmt(v, "V"), fmt(lv.v_in_max, "V")
    pin = f"{inp.ref} pin {inp.pin}"
    sentence = (
        f"the pull rail reaches at most {rail} and {pin} tolerates {limit}"
        if ok
        else f"the pull rail reaches {rail} but {pin} tolerates at most {limit}"
    )
    return Check(
        constraint="input-tolerance",
        title=title,
        ok=ok,
        hard=True,
        formula=_FORMULA,
        substituted=f"{fmt(v, 'V')} ≤ {fmt(lv.v_in_max, 'V')}",
        terms=(Term("V_max", v), Term(f"V_in,max({inp.ref})", lv.v_in_max)),
        source=_SOURCE,
        explanation=why,
        sentence=sentence,
    )
