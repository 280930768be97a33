"""The ``pullproof families`` listing: every built-in family with its numbers and sources."""

from __future__ import annotations

from typing import Any

from .loader import Family, load_families

__all__ = ["families_json", "families_table"]


def _row(fam: Family) -> dict[str, Any]:
    model = fam.model()
    points = fam.breakpoints()
    levels = []
    for vdd in points:
        at = model.at(vdd)
        levels.append(
            {
                "vdd": vdd,
                "vih_min": None if at.vih_min is None else at.vih_min.magnitude("V"),
                "vil_max": None if at.vil_max is None else at.vil_max.magnitude("V"),
                "v_in_max": None if at.v_in_max is None else at.v_in_max.magnitude("V"),
            }
        )

    def amps(q: Any) -> float | None:
        return None if q is None else float(q.to("A").magnitude)

    return {
        "name": fam.name,
        "title": fam.title,
        "standard": fam.standard,
        "status": {k: v.value for k, v in sorted(fam.status.items())},
        "note": fam.note,
        "supply": list(fam.supply),
        "i_high": amps(fam.i_high),
        "i_low": amps(fam.i_low),
        "c_in": None if fam.c_in is None else float(fam.c_in.to("F").magnitude),
        "schmitt_data": bool(fam.schmitt),
        "five_volt_tolerant": model.five_volt_tolerant,
        "levels": levels,
        "file": fam.file,
        "assumed": sorted(fam.assumed),
        "missing": missing_numbers(fam),
    }


# The numbers a family should carry; a listing flags those it still lacks.
_NEEDED = (
    ("i_high", "I_high"), ("i_low", "I_low"), ("v_in_max", "V_in,max"), ("c_in", "C_in"),
)  # fmt: skip


def missing_numbers(fam: Family) -> list[str]:
    """The numbers ``fam`` does not carry (by how reports name them)."""
    out = [name for key, name in _NEEDED if getattr(fam, key) is None]
    model = fam.model()
    for key, name in (("vih_min", "V_IH,min"), ("vil_max", "V_IL,max")):
        if any(getattr(model.at(v), key) is None for v in fam.breakpoints()):
            out.append(name)
    return out


def families_json() -> dict[str, Any]:
    """The ``pullproof.families/1`` document."""
    return {"schema": "pullproof.families/1", "families": [_row(f) for f in _ordered()]}


def _ordered() -> list[Family]:
    return sorted(load_families().values(), key=lambda f: (f.standard, f.name))


def _fmt(value: float | None, scale: float, unit: str) -> str:
    return "—" if value is None else f"{value * scale:g} {unit}"


def families_table() -> str:
    """A readable table: one block per family, thresholds at each tabulated supply."""
    lines = []
    for fam in _ordered():
        row = _row(fam)
        status = row["status"]
        statuses = sorted(set(status.values()))
        lines.append(f"{fam.name:9} {fam.title}")
        lines.append(f"          source: {fam.standard} [{', '.join(statuses)}] ({fam.file})")
        lines.append(
            f"          supply {fam.supply[0]:g}–{fam.supply[1]:g} V; "
            f"I_high {_fmt(row['i_high'], 1e6, 'µA')}; I_low {_fmt(row['i_low'], 1e6, 'µA')}; "
            f"C_in {_fmt(row['c_in'], 1e12, 'pF')}; Schmitt data {'yes' if fam.schmitt else 'no'}; "
            f"5 V tolerant {'yes' if row['five_volt_tolerant'] else 'no'}"
        )
        for lv in row["levels"]:
            lines.append(
                f"          at {lv['vdd']:g} V: V_IH,min {_fmt(lv['vih_min'], 1, 'V')}, "
                f"V_IL,max {_fmt(lv['vil_max'], 1, 'V')}, V_in,max {_fmt(lv['v_in_max'], 1, 'V')}"
            )
        if fam.assumed:
            lines.append(
                f"          ASSUMED (not in its standard): {', '.join(sorted(fam.assumed))}: "
                f"{fam.assumption}"
            )
        if row["missing"]:
            lines.append(f"          MISSING: {', '.join(row['missing'])}")
        lines.append(f"          note: {fam.note}")
    return "\n".join(lines) + "\n"
