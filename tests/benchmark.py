"""Speed and memory of reading, connecting and reviewing schematics.

Not a test (pytest does not collect it): run it by hand and copy the table into the
README's "Performance" section::

    python tests/benchmark.py            # synthetic boards of 50, 200 and 800 pull networks
    python tests/benchmark.py --sizes 100 --repeat 5

    python tests/benchmark.py --limits   # the input limits: copy into "Robustness"

Goals (README): a real 500 kB schematic is read and connected in under 1 s and
reviewed in under 2 s; a synthetic board with 800 pull networks reviews in under 15 s;
peak Python heap stays under 300 MB for all of them. At the input limits (README
"Robustness"): a file above the size limit is refused in under a second with a few MB of
memory, whatever its size; a wire across the whole sheet range costs what a short one
costs; reading stays within the time and memory the README states for the limits.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
import tracemalloc
from collections.abc import Callable
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from builder import HEX_INVERTER_PINS, SWITCH_PINS, SchematicBuilder  # noqa: E402
from pullproof.nets import build_circuit  # noqa: E402
from pullproof.review import review  # noqa: E402

REALWORLD = HERE.parent / ".." / "shared" / "realworld"


def synthetic_board(n: int, folder: Path) -> Path:
    """A board of ``n`` button inputs: +5V pull-up, push button to GND, 74HC14 gate input."""
    b = SchematicBuilder()
    gates = (1, 3, 5, 9, 11, 13)
    for i in range(n):
        x, y = 25.4 + (i % 20) * 38.1, 25.4 + (i // 20) * 30.48
        r, sw, u = f"R{i + 1}", f"SW{i + 1}", f"U{i // 6 + 1}"
        b.resistor(r, "10k 1% 0603", at=(x, y))
        b.power("+5V", at=b.pin_point(r, "1"))
        b.part(sw, "Switch:SW_Push", pins=SWITCH_PINS, at=(x + 10.16, y + 10.16), value="SW_Push")
        b.power("GND", at=b.pin_point(sw, "2"))
        b.wire(b.pin_point(r, "2"), b.pin_point(sw, "1"))
        unit = i % 6 + 1
        b.part(u, "74xx:74HC14", pins=HEX_INVERTER_PINS, at=(x + 20.32, y), value="74HC14",
               unit=unit)  # fmt: skip
        b.wire(b.pin_point(r, "2"), b.pin_point(u, str(gates[unit - 1]), unit=unit))
    path = folder / f"synthetic_{n}.kicad_sch"
    b.write(path)
    return path


def measure(fn: Callable[[], Any], repeat: int) -> tuple[float, float]:
    """(best wall time in s, peak traced heap in MB) of ``fn``."""
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    tracemalloc.start()
    fn()
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return best, peak / 1e6


def _quiet(argv: list[str]) -> int:
    import contextlib
    import io

    from pullproof.cli import main as cli

    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
        return cli(argv)


def _wires(folder: Path, name: str, length_mm: float, points: int) -> Path:
    """One wire ``length_mm`` long (diagonal when long), with ``points`` labels along it."""
    b = SchematicBuilder()
    half = length_mm / 2
    b.wire((-half, -half), (half, half))
    step = length_mm / (points + 1)
    for i in range(points):
        at = -half + (i + 1) * step
        b.label(f"N{i}", at=(round(at, 3), round(at, 3)))
    return b.write(folder / name)


def limit_cases(folder: Path) -> list[tuple[str, int, Callable[[], Any]]]:
    """(case, bytes, what to run) at and beyond the input limits."""
    from pullproof.limits import DEFAULT_MAX_FILE_BYTES, MAX_COORDINATE_MM, MAX_TOKENS_PER_FILE

    big = folder / "big.kicad_sch"
    with open(big, "wb") as fh:  # 50 MB that starts like a schematic (sparse file)
        fh.write(b"(kicad_sch (version 20231120)")
        fh.truncate(50_000_000)
    dense = folder / "dense.kicad_sch"  # lists and words at the token limit
    body = " (a)" * ((MAX_TOKENS_PER_FILE - 4) // 3)
    dense.write_text(f"(kicad_sch (version 20231120){body})", encoding="utf-8")
    at_limit = synthetic_board(1, folder)  # a real-like board just below the file limit
    n = int(DEFAULT_MAX_FILE_BYTES / at_limit.stat().st_size)
    at_limit = synthetic_board(max(1, int(n * 0.97)), folder)
    short = _wires(folder, "short.kicad_sch", 25.4, 2000)
    long = _wires(folder, "long.kicad_sch", 2 * MAX_COORDINATE_MM - 1, 2000)
    return [
        ("a 50 MB file, refused", 50_000_000, lambda: _quiet(["nets", str(big)])),
        (f"{MAX_TOKENS_PER_FILE:,} tokens of '(a)'", dense.stat().st_size,
         lambda: _quiet(["nets", str(dense)])),
        ("a real-like board at the file limit: nets", at_limit.stat().st_size,
         lambda: _quiet(["nets", str(at_limit)])),
        ("the same board: review", at_limit.stat().st_size,
         lambda: _quiet(["review", str(at_limit)])),
        ("a 25 mm wire with 2000 labels on it", short.stat().st_size,
         lambda: _quiet(["nets", str(short)])),
        ("a 28 m diagonal with 2000 labels on it", long.stat().st_size,
         lambda: _quiet(["nets", str(long)])),
    ]  # fmt: skip


def limits_table(repeat: int) -> None:
    with tempfile.TemporaryDirectory() as tmp:
        rows = [(name, size, *measure(fn, repeat)) for name, size, fn in limit_cases(Path(tmp))]
    print("| case | bytes | time | heap |")
    print("|---|---|---|---|")
    for name, size, t, m in rows:
        print(f"| {name} | {size:,} | {t:.2f} s | {m:.0f} MB |")


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="*", default=[50, 200, 800])
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--limits", action="store_true", help="measure the input limits instead")
    args = ap.parse_args(argv)
    if args.limits:
        limits_table(args.repeat)
        return 0
    rows: list[tuple[str, int, float, float, float, float]] = []
    with tempfile.TemporaryDirectory() as tmp:
        cases: list[tuple[str, Path]] = [
            (f"synthetic, {n} pulls", synthetic_board(n, Path(tmp))) for n in args.sizes
        ]
        if REALWORLD.is_dir():
            for name, root in (
                ("dispensy (3 files, 505 kB)", "dispensy/dispensy.kicad_sch"),
                ("europi (375 kB, v10)", "europi/europi-surface-mount.kicad_sch"),
            ):
                cases.append((name, REALWORLD / root))
        for name, path in cases:
            synthetic = path.name.startswith("synthetic_")
            files = [path] if synthetic else list(path.parent.glob("*.kicad_sch"))
            size = sum(p.stat().st_size for p in files)
            t_nets, m_nets = measure(lambda p=path: build_circuit(p), args.repeat)
            t_rev, m_rev = measure(lambda p=path: review(p), args.repeat)
            rows.append((name, size, t_nets, m_nets, t_rev, m_rev))
    print("| case | schematic bytes | nets: time | nets: heap | review: time | review: heap |")
    print("|---|---|---|---|---|---|")
    for name, size, tn, mn, tr, mr in rows:
        print(f"| {name} | {size:,} | {tn:.2f} s | {mn:.0f} MB | {tr:.2f} s | {mr:.0f} MB |")
    return 0


if __name__ == "__main__":
    sys.exit(main())
