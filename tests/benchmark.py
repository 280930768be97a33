"""Speed and memory of every stage of a review, on synthetic boards of 10 … 10 000 networks.

Not a test (pytest does not collect it): run it by hand and copy the tables into the README's
"Performance" section::

    python tests/benchmark.py                      # N = 10, 100, 1000, 10000, flat and hierarchical
    python tests/benchmark.py --sizes 10 --smoke   # what CI runs: one quick pass, no real design

Each board has N networks of one pull-up, one push button and one 74HC14 input (the flat
board on one sheet; the hierarchical board as one sheet used ten times). For each N, a fresh
process measures, in CPU seconds (``time.process_time``):

* ``floor``: one regular expression tokenising the text — the least any reader must do;
* ``loads``: ``sexpdata.loads`` of the text alone;
* ``parse``: pullproof reading every file into its model (S-expressions, spans, records);
* ``connect``: connectivity (sheet graphs, names, hierarchy) into the circuit;
* ``detect``: part data, rails and pull networks with their numbers;
* ``evaluate``: constraints, windows, verdicts and recommendations;
* ``json``: the review JSON document written as ``review --json`` writes it (to a sink);
* ``note``: the HTML design note, written to a file as ``pullproof note`` writes it.

``review`` is parse + connect + detect + evaluate + json, compared with ``loads``. Every
stage, ``loads`` and ``floor`` included, runs inside :func:`pullproof.heap.few_collections`,
as every command does, in a fresh process per board (so that no board's heap or memos carry
into the next one's times). The peak resident memory is that of a separate
``pullproof review --json`` process (``VmHWM``: the process's own high-water mark; ``ru_maxrss``
would also count the benchmark's pages that the child inherits across fork and exec),
compared with the schematic text size.
The growth line gives t(10 000) / t(1 000) per stage; the last lines check the targets.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import re
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

import sexpdata  # noqa: E402

from builder import HEX_INVERTER_PINS, SWITCH_PINS, SchematicBuilder  # noqa: E402
from pullproof.limits import InputPolicy  # noqa: E402

REALWORLD = HERE.parent / ".." / "shared" / "realworld"
STAGES = ("parse", "connect", "detect", "evaluate", "json")
# The flat board of 10 000 networks is a 20 MB file: above the default 10 MB limit, as a
# user's would be; the benchmark raises the limits as such a user does.
LARGE_ARGS = ("--max-file-size", "100", "--max-total-size", "250")
LARGE = InputPolicy(max_file_bytes=100_000_000, max_total_bytes=250_000_000)
COPIES = 10  # instances of the hierarchical board's one sub-sheet
_TOKEN = re.compile(r'[()]|"(?:[^"\\]|\\.)*"|[^\s()"]+')
GATES = (1, 3, 5, 9, 11, 13)


def _draw_buttons(b: SchematicBuilder, n: int, refs: Callable[[str], Any] = lambda r: None) -> None:
    """``n`` networks: +5V pull-up, push button to GND, 74HC14 gate input (six per package)."""
    cols = max(20, math.isqrt(n - 1) + 1)  # a square-ish grid keeps 10 000 within ±10 m
    for i in range(n):
        x, y = 25.4 + (i % cols) * 38.1, 25.4 + (i // cols) * 30.48
        r, sw, u = f"R{i + 1}", f"SW{i + 1}", f"U{i // 6 + 1}"
        b.resistor(r, "10k 1% 0603", at=(x, y), instances=refs(r))
        b.power("+5V", at=b.pin_point(r, "1"))
        b.part(
            sw,
            "Switch:SW_Push",
            pins=SWITCH_PINS,
            at=(x + 10.16, y + 10.16),
            value="SW_Push",
            instances=refs(sw),
        )
        b.power("GND", at=b.pin_point(sw, "2"))
        b.wire(b.pin_point(r, "2"), b.pin_point(sw, "1"))
        unit = i % 6 + 1
        b.part(
            u,
            "74xx:74HC14",
            pins=HEX_INVERTER_PINS,
            at=(x + 20.32, y),
            value="74HC14",
            unit=unit,
            instances=refs(u),
        )
        b.wire(b.pin_point(r, "2"), b.pin_point(u, str(GATES[unit - 1]), unit=unit))


def flat_board(n: int, folder: Path) -> Path:
    """One sheet with ``n`` button networks."""
    b = SchematicBuilder()
    _draw_buttons(b, n)
    return b.write(folder / f"flat_{n}.kicad_sch")


def hierarchical_board(n: int, folder: Path) -> Path:
    """A root using one sheet of ``n / COPIES`` networks ``COPIES`` times (own references each)."""
    per = max(1, n // COPIES)
    root = SchematicBuilder()
    blocks = [
        root.sheet(f"CH{k}", f"channel_{n}.kicad_sch", at=(25.4 * k, 25.4)) for k in range(COPIES)
    ]
    paths = [f"/{root.uuid}/{u}" for u in blocks]

    def refs(ref: str) -> dict[str, str | tuple[str, int]]:
        head = re.match(r"[A-Z]+", ref)
        assert head is not None
        number = int(ref[head.end() :])
        return {p: f"{head.group()}{k * 100000 + number}" for k, p in enumerate(paths)}

    child = SchematicBuilder()
    _draw_buttons(child, per, refs)
    child.write(folder / f"channel_{n}.kicad_sch")
    return root.write(folder / f"hier_{n}.kicad_sch")


class _Clock:
    """Accumulates the CPU time spent inside one wrapped function."""

    def __init__(self) -> None:
        self.total = 0.0

    def wrap(self, fn: Callable[..., Any]) -> Callable[..., Any]:
        def timed(*a: Any, **kw: Any) -> Any:
            t0 = time.process_time()
            try:
                return fn(*a, **kw)
            finally:
                self.total += time.process_time() - t0

        return timed


def stage_times(root: Path, with_note: bool = True) -> dict[str, float]:
    """CPU seconds of every stage for one root, measured in this process."""
    from pullproof.heap import few_collections

    with few_collections():
        return _stage_times(root, with_note)


def _stage_times(root: Path, with_note: bool) -> dict[str, float]:
    import pullproof.constraints as constraints
    import pullproof.review as review_mod
    from pullproof.families.match import PartLibrary
    from pullproof.nets import circuit_from_hierarchy
    from pullproof.report.note import write_note
    from pullproof.report.review_json import review_json
    from pullproof.report.safe_text import write_json_safely
    from pullproof.review import Selection, review_circuit
    from pullproof.rules import load_rules
    from pullproof.schematic.hierarchy import load_hierarchy

    texts = [(root.parent / name).read_text(encoding="utf-8") for name in sorted(_names(root))]
    out: dict[str, float] = {}
    t0 = time.process_time()
    for text in texts:
        _TOKEN.findall(text)
    out["floor"] = time.process_time() - t0
    t0 = time.process_time()
    for text in texts:
        sexpdata.loads(text, nil=None, true=None, false=None, line_comment="\x00")
    out["loads"] = time.process_time() - t0
    t0 = time.process_time()
    hier = load_hierarchy(root, LARGE)
    out["parse"] = time.process_time() - t0
    t0 = time.process_time()
    circuit = circuit_from_hierarchy(hier, str(root))
    out["connect"] = time.process_time() - t0
    # evaluate: judging each network, and the one look-up of the constraint registry
    # (entry points) that precedes the first.
    clock = _Clock()
    saved, saved_registry = review_mod.evaluate, constraints.registry
    review_mod.evaluate = clock.wrap(saved)  # type: ignore[assignment]
    constraints.registry = clock.wrap(saved_registry)  # type: ignore[assignment]
    try:
        t0 = time.process_time()
        result = review_circuit(circuit, load_rules(root), PartLibrary(()), Selection())
        whole = time.process_time() - t0
    finally:
        review_mod.evaluate = saved  # type: ignore[assignment]
        constraints.registry = saved_registry  # type: ignore[assignment]
    out["evaluate"] = clock.total
    out["detect"] = whole - clock.total
    written = [0]

    def sink(piece: str) -> None:
        written[0] += len(piece)

    t0 = time.process_time()
    write_json_safely(review_json(result, streamed=True), sink)
    out["json"] = time.process_time() - t0
    out["json_mb"] = written[0] / 1e6
    if with_note:
        note = root.parent / "benchmark-note.html"
        t0 = time.process_time()
        write_note(result, note, title="benchmark", date="2031-01-01")
        out["note"] = time.process_time() - t0
        out["note_mb"] = note.stat().st_size / 1e6
        note.unlink()
    out["review"] = sum(out[s] for s in STAGES)
    out["networks"] = float(len(result.networks))
    return out


def stage_times_apart(root: Path) -> dict[str, float]:
    """:func:`stage_times` of ``root`` measured in a fresh child process."""
    return dict(json.loads(_child(__file__, "--stages-of", str(root)).stdout))


def _names(root: Path) -> set[str]:
    from pullproof.schematic.hierarchy import load_hierarchy

    return {Path(p).name for p in load_hierarchy(root, LARGE).absolute.values()}


_CHILD = """
import os, resource, sys, time
from pullproof.cli import main
sys.stdout = open(os.devnull, "w")
main(sys.argv[1:])
usage = resource.getrusage(resource.RUSAGE_SELF)
with open("/proc/self/status", encoding="ascii") as status:
    hwm = next((line.split()[1] for line in status if line.startswith("VmHWM:")), usage.ru_maxrss)
sys.stderr.write(f"{usage.ru_utime + usage.ru_stime} {hwm}")
"""


# A child process may keep compiled bytecode, as an installed package has it: without it
# (PYTHONDONTWRITEBYTECODE set) every run compiles every module again, ~60 ms of start-up.
_CHILD_ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def _child(*argv: str) -> subprocess.CompletedProcess[str]:
    """``python ARGV`` in a child process with the bytecode kept; its output captured."""
    return subprocess.run(
        [sys.executable, *argv], capture_output=True, text=True, check=True, env=_CHILD_ENV
    )


def process_run(root: Path, *command: str) -> tuple[float, float, int]:
    """(wall s, CPU s, peak RSS bytes) of a whole ``pullproof COMMAND ROOT`` process
    (default ``review ROOT --json``), interpreter start-up and imports included."""
    args = [*command, str(root)] if command else ["review", str(root), "--json", *LARGE_ARGS]
    t0 = time.perf_counter()
    done = _child("-c", _CHILD, *args)
    wall = time.perf_counter() - t0
    cpu, rss_kb = done.stderr.split()[-2:]
    return wall, float(cpu), int(rss_kb) * 1024  # Linux reports kilobytes


def _text_bytes(root: Path) -> int:
    return sum((root.parent / n).stat().st_size for n in _names(root))


def _fmt(x: float) -> str:
    return f"{x:.3f}" if x < 10 else f"{x:.1f}"


def table(kind: str, rows: list[tuple[int, int, dict[str, float], int]]) -> str:
    """The Markdown table of one board kind: per N, stage times, throughput and memory."""
    head = [
        "N",
        "text MB",
        "floor",
        "loads",
        *STAGES,
        "review",
        "review/loads",
        "MB/s",
        "networks/s",
        "note",
        "note ms/net",
        "peak RSS MB",
        "RSS/text",
    ]
    lines = [
        f"**{kind}** (CPU seconds; shares of `review` in brackets)",
        "",
        "| " + " | ".join(head) + " |",
        "|" + "---|" * len(head),
    ]
    for n, size, t, rss in rows:
        review = t["review"] or 1e-9
        cells = [
            f"{n:,}",
            f"{size / 1e6:.2f}",
            _fmt(t["floor"]),
            _fmt(t["loads"]),
            *(f"{_fmt(t[s])} ({100 * t[s] / review:.0f} %)" for s in STAGES),
            _fmt(t["review"]),
            f"{t['review'] / max(t['loads'], 1e-9):.1f}×",
            f"{size / 1e6 / review:.2f}",
            f"{t['networks'] / review:,.0f}",
            _fmt(t.get("note", 0.0)),
            f"{1000 * t.get('note', 0.0) / max(t['networks'], 1):.2f}",
            f"{rss / 1e6:.0f}",
            f"{rss / size:.0f}×",
        ]
        lines.append("| " + " | ".join(cells) + " |")
    by_n = {n: t for n, _, t, _ in rows}
    if 1000 in by_n and 10000 in by_n:
        a, b = by_n[1000], by_n[10000]
        growth = ", ".join(
            f"{s} {b[s] / max(a[s], 1e-9):.1f}×"
            for s in ("floor", "loads", *STAGES, "review", "note")
        )
        lines += ["", f"Growth t(10 000)/t(1 000): {growth} (target ≤ 12 each)"]
    n, size, t, rss = rows[-1]
    lines += [
        "",
        f"Targets at N = {n:,}: review/loads {t['review'] / max(t['loads'], 1e-9):.1f}× "
        f"(≤ 2×); note {1000 * t.get('note', 0.0) / max(t['networks'], 1):.2f} ms/network "
        f"(≤ 1); peak RSS {rss / size:.0f}× the text (≤ 25×); JSON {t['json_mb']:.0f} MB, "
        f"note {t.get('note_mb', 0.0):.0f} MB",
    ]
    return "\n".join(lines) + "\n"


def folder_for_empty() -> Path:
    """A schematic with no parts at all, for the start-up cost."""
    folder = Path(tempfile.mkdtemp())
    return SchematicBuilder().write(folder / "empty.kicad_sch")


def startup(root: Path) -> str:
    """Whole-process CPU of ``nets`` and ``review`` on a design with no networks (best of 5,
    after one run of each that leaves the bytecode compiled)."""
    process_run(root, "nets"), process_run(root, "review")
    nets = min(process_run(root, "nets")[1] for _ in range(5))
    review = min(process_run(root, "review")[1] for _ in range(5))
    return (
        f"start-up (a design with no networks, whole process, best of 5): `nets` {nets:.3f} s, "
        f"`review` {review:.3f} s CPU: review costs {1000 * (review - nets):.0f} ms more"
    )


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="*", default=[10, 100, 1000, 10000])
    ap.add_argument("--smoke", action="store_true", help="skip the real-design timing (for CI)")
    ap.add_argument("--stages-of", type=Path, help=argparse.SUPPRESS)  # the child's task
    args = ap.parse_args(argv)
    if args.stages_of:
        print(json.dumps(stage_times(args.stages_of)))
        return 0
    started = time.perf_counter()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        for kind, draw in (("flat", flat_board), ("hierarchical", hierarchical_board)):
            rows = []
            for n in args.sizes:
                root = draw(n, folder)
                times = stage_times_apart(root)
                _, _, rss = process_run(root)
                rows.append((n, _text_bytes(root), times, rss))
                for f in folder.glob(f"*_{n}.kicad_sch"):
                    f.unlink()
            print(table(kind, rows))
    if not args.smoke:
        print(startup(folder_for_empty()))
        if REALWORLD.is_dir():
            root = REALWORLD / "buspirate6" / "6-REV2b.kicad_sch"
            runs = [process_run(root) for _ in range(3)]
            wall = min(r[0] for r in runs)
            cpu = min(r[1] for r in runs)
            print(
                f"buspirate6 ({_text_bytes(root) / 1e6:.2f} MB, 6 sheets): whole "
                f"`pullproof review --json` process {wall:.2f} s wall, {cpu:.2f} s CPU "
                "(best of 3; target < 1 s)"
            )
    print(f"\nbenchmark took {time.perf_counter() - started:.0f} s on {os.cpu_count()} cores")
    return 0


if __name__ == "__main__":
    sys.exit(main())
