"""The constraint engine: each constraint turns a pull network into bounds on R and checks.

A constraint is any object with an ``id`` and a ``title`` that can be called with a
:class:`~pullproof.network.PullNetwork` and returns a tuple of
:class:`~pullproof.results.Bound` (a min or max on R) and
:class:`~pullproof.results.Check` (a pass/fail condition independent of R), or an
empty tuple when it does not apply.

Every built-in constraint is listed in :data:`BUILTIN` below, in report order.
Third parties add constraints through the entry-point group
``pullproof.constraints``; each entry point must load a constraint object::

    [project.entry-points."pullproof.constraints"]
    relay-coil = "mypkg.checks:RELAY_COIL"
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from types import MappingProxyType
from typing import Any

from ..errors import PullproofError
from ._common import Builtin, Constraint
from .budget import current_budget
from .contact import contact_rating, wetting_current
from .debounce import debounce_holdoff
from .driver import driver_sink, opto_output
from .edges import edge_rate
from .levels import high_level_holds, low_level_holds
from .power import resistor_power, working_voltage
from .preferred import preferred_range
from .tolerance import input_tolerance

__all__ = ["BUILTIN", "ENTRY_POINT_GROUP", "Constraint", "ConstraintPluginError", "registry"]

ENTRY_POINT_GROUP = "pullproof.constraints"

_ALL = (
    Builtin("high-level-holds", "High level holds", high_level_holds),
    Builtin("low-level-holds", "Low level holds", low_level_holds),
    Builtin("resistor-power", "Resistor power while pulled", resistor_power),
    Builtin("contact-rating", "Switch contact rating", contact_rating),
    Builtin("wetting-current", "Contact wetting current", wetting_current),
    Builtin("driver-sink", "Driver sink current", driver_sink),
    Builtin("opto-output", "Optocoupler output", opto_output),
    Builtin("current-budget", "Current budget", current_budget),
    Builtin("edge-rate", "Edge through the undefined band", edge_rate),
    Builtin("debounce-holdoff", "Debounce hold-off", debounce_holdoff),
    Builtin("input-tolerance", "Input tolerates the pull rail", input_tolerance),
    Builtin("working-voltage", "Resistor working voltage", working_voltage),
    Builtin("preferred-range", "Preferred range", preferred_range),
)

#: The built-in constraints by id: the one place they are registered.
BUILTIN: Mapping[str, Constraint] = MappingProxyType({c.id: c for c in _ALL})


class ConstraintPluginError(PullproofError, ImportError):
    """A constraint from an entry point cannot be loaded, clashes, or fails when run."""


def entry_points(group: str) -> Iterable[Any]:
    """The installed entry points of ``group``. ``importlib.metadata`` is imported here, on
    first use: it costs about 20 ms of start-up that a design without pull networks (which
    never asks for the registry) need not pay."""
    from importlib.metadata import entry_points as installed

    return installed(group=group)


def registry(*, plugins: bool = True) -> Mapping[str, Constraint]:
    """The built-in constraints plus those installed through entry points.

    Raises :class:`ConstraintPluginError` when an entry point fails to load, loads
    something that is not a constraint, or reuses an id already taken.
    """
    if not plugins:
        return BUILTIN
    found: dict[str, Constraint] = dict(BUILTIN)
    for ep in entry_points(group=ENTRY_POINT_GROUP):
        try:
            obj = ep.load()
        except Exception as exc:  # a broken plugin must not become a traceback
            raise ConstraintPluginError(
                f"constraint entry point {ep.name!r} ({ep.value}) failed to load: {exc}"
            ) from None
        cid = getattr(obj, "id", None)
        if (
            not isinstance(cid, str)
            or not isinstance(getattr(obj, "title", None), str)
            or not (callable(obj))
        ):
            raise ConstraintPluginError(
                f"constraint entry point {ep.name!r} ({ep.value}) is not a constraint: "
                "expected an object with 'id' and 'title' strings that is callable"
            )
        if cid in found:
            raise ConstraintPluginError(
                f"constraint entry point {ep.name!r} ({ep.value}) reuses the id {cid!r}"
            )
        found[cid] = obj
    return MappingProxyType(found)
