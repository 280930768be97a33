"""``pullproof parts``: the numbers to collect, and a part-library skeleton ready to edit.

:func:`parts_listing` prints, per distinct part, every number its networks lack or assume
(with the value used and where a datasheet gives it), the pins on pulled nets, its supply
rail and the networks that wait for it; then rails of unknown voltage with a ready
``[rails]`` snippet, the rules defaults the verdicts assume, and nets whose input is off
the schematic. :func:`skeleton_text` is the part library: one ``[part.NAME]`` table per
part with its ``match`` globs and pins, every needed key holding the assumed value, each
with a comment saying what the number is and where a datasheet gives it. Its entries say
``status = "assumed"``, so loading it changes no verdict's basis until the designer has
put the datasheet's figures in and set ``status = "user"``.
"""

from __future__ import annotations

import datetime
import json
import os
import re
from collections.abc import Iterable
from pathlib import Path

from ..errors import PullproofError
from ..families.classes import INPUT_KEYS, load_classes
from ..partdata import DATASHEET, Need, Needs, PartNeeds, natural, refs_text
from ..textfile import write_report

__all__ = ["SkeletonError", "parts_listing", "skeleton_text", "write_skeleton"]


class SkeletonError(PullproofError):
    """The skeleton cannot be written (the file exists and --force was not given)."""


def _waiting(networks: list[str], limit: int = 4) -> str:
    more = f" and {len(networks) - limit} more" if len(networks) > limit else ""
    return "; ".join(networks[:limit]) + more


def _need_line(n: Need) -> str:
    used = "missing" if n.text is None else f"{n.text}, assumed ({n.basis})"
    where = DATASHEET.get(n.key, n.fix)
    return f"    {n.quantity:14} {used}: {where}"


def _part_block(p: PartNeeds) -> list[str]:
    kind = p.kind.value
    lines = [f"{p.name}  ({refs_text(p.refs)}; symbol {', '.join(p.symbols)}; {kind})"]
    if p.family:
        lines.append(f"  data: family {p.family} (its missing numbers go in fields on the part)")
    if p.entry:
        lines.append(f"  data: part-library entry {p.entry} (add the numbers to it)")
    if p.supplies:
        lines.append(f"  supply: {', '.join(p.supplies)}")
    if p.pins:
        pins = ", ".join(f"{pin} ({net})" for pin, net in p.pins.items())
        lines.append(f"  pins on pulled nets: {pins}")
    lines.append("  numbers to confirm:")
    lines.extend(_need_line(n) for n in p.used)
    lines.append(f"  waiting: {_waiting(p.networks)}")
    return lines


def parts_listing(needs: Needs) -> str:
    """The console listing of ``pullproof parts``."""
    out: list[str] = []
    head = (
        f"input class for parts without data: {needs.assume}"
        if needs.assume != "none"
        else "assumptions off (--strict): only missing numbers"
    )
    out.append(f"pullproof parts ({head})\n")
    if not (needs.parts or needs.rails or needs.rules or needs.nets or needs.other):
        out.append("\nevery verdict rests on stated data: nothing to collect\n")
        return "".join(out)
    for p in needs.parts:
        out.append("\n" + "\n".join(_part_block(p)) + "\n")
    if needs.rails:
        out.append("\nrails of unknown voltage (for the rules file):\n  [rails]\n")
        for r in needs.rails:
            how = f"judged over {r.text} ({r.basis})" if r.text else "not judged"
            out.append(f"  {_rail_line(r.name, r.snippet)}\n")
            out.append(f"    # {how}; waiting: {_waiting(r.networks)}\n")
    if needs.rules:
        out.append("\nrules defaults the verdicts assume (state them in the rules file):\n")
        out.extend(f"  {line}\n" for line in rules_snippet(needs))
    if needs.nets:
        out.append("\nnets whose input is off this schematic (say what is on the far side):\n")
        out.extend(f"  {line}\n" for line in nets_snippet(needs))
    if needs.other:
        out.append("\nother values missing:\n")
        out.extend(f"  {net}: {what}; {hint}\n" for net, what, hint in needs.other)
    return "".join(out)


_RAIL_FIX = re.compile(r"^\[rails\] (?P<line>.+?)(?: \(.*\))?$")


def _rail_line(name: str, snippet: str) -> str:
    m = _RAIL_FIX.match(snippet)
    return m.group("line") if m is not None else snippet


def rails_snippet(needs: Needs) -> list[str]:
    return ["[rails]", *(_rail_line(r.name, r.snippet) for r in needs.rails)]


def rules_snippet(needs: Needs) -> list[str]:
    """The ``[resistor]``/``[i2c]`` lines stating the defaults the verdicts assumed."""
    resistor: list[str] = []
    sizes: dict[str, dict[str, str]] = {"power": {}, "working_voltage": {}}
    fields: list[str] = []
    i2c: list[str] = []
    for n in needs.rules:
        refs = _waiting(sorted(n.refs, key=natural), 6).replace("; ", ", ")
        if n.quantity == "tolerance":
            resistor.append(f'tolerance = "{n.text}"   # assumed for {refs}')
        elif n.quantity == "TCR":
            resistor.append(f'tcr = "{n.text}"   # assumed for {refs}')
        elif n.quantity == "bus capacitance":
            nets = _waiting(n.networks, 3)
            i2c.append(f'bus_capacitance = "{n.text}"   # assumed for {nets}')
        else:
            m = re.match(r"^(?P<v>.+) \((?P<size>\d{4} size|array-element)\)$", n.text)
            key = "power" if n.quantity == "power rating" else "working_voltage"
            if m is not None:
                size = m.group("size").removesuffix(" size").replace("array-element", "array")
                sizes[key][size] = m.group("v").replace(" ", "")
            else:
                fields.append(f"# {n.quantity} {n.text} of {refs}: {n.fix}")
    for key, table in sizes.items():
        if table:
            body = ", ".join(f'"{size}" = "{v}"' for size, v in sorted(table.items()))
            resistor.append(f"{key} = {{ {body} }}   # the ratings assumed, by chip size")
    out = ["[resistor]", *resistor] if resistor else []
    if i2c:
        out += ["[i2c]", *i2c]
    return out + fields


def nets_snippet(needs: Needs) -> list[str]:
    out = []
    for net in needs.nets:
        out += [
            "# [[net]]",
            f"# match = {json.dumps(net.rsplit('/', 1)[-1])}",
            f'# input = "{needs.assume if needs.assume != "none" else "cmos"}"   '
            "# the far side's input class or family",
        ]
    return out


# ------------------------------------------------------------------ the skeleton


def _toml(text: str) -> str:
    return json.dumps(text, ensure_ascii=False)  # a TOML basic string is JSON-compatible


def _glob(text: str) -> str:
    """``text`` as a glob matching only itself."""
    return re.sub(r"([*?\[])", r"[\1]", text)


def _value(n: Need) -> str:
    """The value to write: the one used, or the input class's for a missing number."""
    if n.text is not None:
        text = n.text
    else:
        number = load_classes().inputs["cmos"].numbers.get(n.key)
        text = number.text if number is not None else ""
    if " … " in text:  # a supply range
        lo, hi = text.split(" … ")
        return f"[{_toml(lo)}, {_toml(hi)}]"
    return _toml(text.replace(" ", "") if not re.search(r"\d\s*VDD", text) else text)


def _comment(n: Need) -> str:
    used = "MISSING: no value was used" if n.text is None else f"assumed ({n.basis})"
    return f"{used}; {DATASHEET.get(n.key, n.quantity)}"


_NOTE = "skeleton by pullproof parts: replace each value with the datasheet figure"


def _entry(p: PartNeeds) -> list[str]:
    name = _toml(p.name)
    order = {k: i for i, k in enumerate((*INPUT_KEYS, "v_ol", "i_ol", "i_off"))}
    ordered = sorted(p.library_keys, key=lambda n: order.get(n.key, len(order)))
    keys = [n for n in ordered if n.key not in ("vih_min", "vil_max")]
    levels = [n for n in ordered if n.key in ("vih_min", "vil_max")]
    nets = _waiting(p.networks, 3)
    lines = [
        f"[part.{name}]",
        f"# {refs_text(p.refs)} (symbol {', '.join(p.symbols)})"
        + (f"; supply rail {', '.join(p.supplies)}" if p.supplies else ""),
        f"# waiting: {nets}",
        f"match = [{_toml(_glob(p.value or p.symbols[0]))}]",
        f"kind = {_toml(p.kind.value)}",
    ]
    if p.pins and any(n.key in INPUT_KEYS for n in p.library_keys):
        lines.append(f"pins = [{', '.join(_toml(_glob(pin)) for pin in p.pins)}]")
    lines += [
        'status = "assumed"   # set "user" once every number below is the datasheet\'s',
        f"note = {_toml(_NOTE)}",
    ]
    width = max((len(f"{n.key} = {_value(n)}") for n in p.library_keys), default=0) + 2
    for n in keys:
        text = f"{n.key} = {_value(n)}"
        lines.append(f"{text.ljust(width)}# {_comment(n)}")
    if levels:
        lines.append(f"[[part.{name}.levels]]")
        supply = p.needs.get("supply")
        vdd = _value(supply) if supply is not None else '["1.1V", "5.5V"]'
        lines.append(f"vdd = {vdd}   # the supply range the levels hold for")
        for n in levels:
            text = f"{n.key} = {_value(n)}"
            lines.append(f"{text.ljust(width)}# {_comment(n)}")
    return lines


def skeleton_text(needs: Needs, root: str, today: datetime.date | None = None) -> str:
    """The part-library skeleton for ``needs`` (a TOML file that loads as it is)."""
    date = (today or datetime.date.today()).isoformat()
    head = [
        f"# pullproof part library: a SKELETON written by `pullproof parts` for {root} on {date}.",
        "# Every number below is the value the review ASSUMED for the part (the comment names",
        "# the assumption) or, marked MISSING, a proposal to replace. Put in the figure from the",
        "# part's own datasheet (each comment says what the number is and where a datasheet gives",
        '# it), then set status = "user" in that entry: until then its numbers stay assumptions.',
        '# Syntax: README, "Part library" (keys as in the logic-family files; levels may be',
        '# written as fractions of the supply, "0.7 VDD").',
    ]
    body: list[str] = []
    for p in needs.entries:
        body += ["", *_entry(p)]
    tail: list[str] = []
    extra = [*(rails_snippet(needs) if needs.rails else []), *rules_snippet(needs)]
    nets = nets_snippet(needs)
    if extra or nets:
        tail = [
            "",
            "# For the rules file (pullproof.toml), not this part library: the rails and",
            "# defaults the verdicts assumed, ready to state (remove the leading '# ').",
            *(line if line.startswith("#") else f"# {line}" for line in extra),
        ]
    if nets:
        tail += [
            "# Nets whose input is off this schematic: say what is on the far side only if",
            "# you know it (an input class stays an assumption; a family is data).",
            *(f"#{line}" for line in nets),
        ]
    return "\n".join([*head, *body, *tail]) + "\n"


def write_skeleton(
    needs: Needs,
    path: str | os.PathLike[str],
    *,
    force: bool = False,
    inputs: Iterable[str] = (),
    root: str = "",
) -> None:
    """Write the skeleton atomically; an existing file only with ``force``.

    Raises:
        SkeletonError: the file exists and ``force`` is false.
        PullproofError: it cannot be written (or is a file the review read).
    """
    target = Path(path)
    if target.is_dir():
        raise SkeletonError(f"{target}: is a folder; name the file to write")
    if target.exists() and not force:
        raise SkeletonError(f"{target}: exists; give --force to overwrite it")
    write_report(target, skeleton_text(needs, root), "part-library skeleton", tuple(inputs))
