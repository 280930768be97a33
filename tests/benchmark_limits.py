"""Time and memory at and beyond the input limits (README "Robustness").

Not a test (pytest does not collect it): run it by hand and copy the table into the
README's "Robustness" section::

    python tests/benchmark_limits.py
    python tests/benchmark_limits.py --repeat 1

Goals (README): a file above the size limit is refused in under a second with a few MB of
memory, whatever its size; a wire across the whole ±10 m range costs what a short one
costs; a file at the size limit, and the densest file the token limit lets through, are
read within the time and memory the README states as the bound. Each case runs
``pullproof.cli.main`` in this process: the best wall time of ``--repeat`` runs, the peak resident
memory of the same command in a separate process (``VmHWM``), and with ``--heap`` the peak
Python heap (``tracemalloc``) of one more run.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import resource
import subprocess
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from benchmark import flat_board  # noqa: E402
from builder import SchematicBuilder  # noqa: E402
from pullproof.cli import main as cli  # noqa: E402
from pullproof.limits import (  # noqa: E402
    DEFAULT_MAX_FILE_BYTES,
    MAX_COORDINATE_MM,
    MAX_TOKENS_PER_FILE,
)


def _quiet(argv: list[str]) -> int:
    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
        return cli(argv)


def _wire_with_labels(folder: Path, name: str, length_mm: float, points: int) -> Path:
    """One diagonal wire ``length_mm`` long on each axis, with ``points`` labels on it."""
    b = SchematicBuilder()
    half = length_mm / 2
    b.wire((-half, -half), (half, half))
    step = length_mm / (points + 1)
    for i in range(points):
        at = round(-half + (i + 1) * step, 3)
        b.label(f"N{i}", at=(at, at))
    return b.write(folder / name)


def _three_sheets(folder: Path, n: int) -> Path:
    """A root placing three sheets of ``n`` networks each (their references repeat from sheet
    to sheet: only the time and memory matter here)."""
    root = SchematicBuilder()
    for k in range(3):
        sheet = flat_board(n, folder).rename(folder / f"sheet{k}.kicad_sch")
        root.sheet(f"S{k}", sheet.name, at=(25.4 * k, 25.4))
    return root.write(folder / "project.kicad_sch")


def _size(path: Path) -> int:
    """Bytes of ``path`` and, for the three-sheet project, of its sheets."""
    sheets = list(path.parent.glob("sheet*.kicad_sch")) if path.name == "project.kicad_sch" else []
    return path.stat().st_size + sum(p.stat().st_size for p in sheets)


def cases(folder: Path) -> list[tuple[str, Path, list[str]]]:
    """(case, file, argv) at and beyond the limits."""
    big = folder / "big.kicad_sch"
    with open(big, "wb") as fh:  # 50 MB that starts like a schematic (a sparse file)
        fh.write(b"(kicad_sch (version 20231120)")
        fh.truncate(50_000_000)
    dense = folder / "dense.kicad_sch"  # lists and words just below the token limit
    body = " (a)" * ((MAX_TOKENS_PER_FILE - 10) // 3)
    dense.write_text(f"(kicad_sch (version 20231120){body})", encoding="utf-8")
    per_network = flat_board(100, folder).stat().st_size / 100
    at_limit = flat_board(int(DEFAULT_MAX_FILE_BYTES / per_network * 0.97), folder)
    project = _three_sheets(folder, int(8_000_000 / per_network))
    short = _wire_with_labels(folder, "short.kicad_sch", 25.4, 2000)
    long = _wire_with_labels(folder, "long.kicad_sch", 2 * MAX_COORDINATE_MM - 2, 2000)
    return [
        ("a 50 MB file: refused", big, ["nets", str(big)]),
        (f"{MAX_TOKENS_PER_FILE:,} tokens of '(a)': nets", dense, ["nets", str(dense)]),
        ("a board just below the file limit: nets", at_limit, ["nets", str(at_limit)]),
        ("the same board: review", at_limit, ["review", str(at_limit)]),
        ("three such sheets of 8 MB (24 MB in all): review", project, ["review", str(project)]),
        ("a 25 mm diagonal wire with 2000 labels on it", short, ["nets", str(short)]),
        ("a 28 m diagonal wire with 2000 labels on it", long, ["nets", str(long)]),
    ]


def measure(argv: list[str], repeat: int, heap: bool) -> tuple[float, float, float]:
    """(best wall time s, peak traced heap MB or nan, peak RSS MB of a separate process)."""
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        _quiet(argv)
        best = min(best, time.perf_counter() - t0)
    peak = float("nan")
    if heap:  # tracemalloc slows Python down several times: only on request
        tracemalloc.start()
        _quiet(argv)
        peak = tracemalloc.get_traced_memory()[1]
        tracemalloc.stop()
    # VmHWM (peak resident set) of the new process: ru_maxrss would carry over the parent's
    # peak across fork and exec on Linux.
    code = (
        "import sys, contextlib, io, re\n"
        "from pullproof.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()): main(sys.argv[1:])\n"
        "print(re.search(r'VmHWM:\\s+(\\d+)', open('/proc/self/status').read()).group(1))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code, *argv], capture_output=True, text=True, check=False
    ).stdout
    rss_kb = int(out.strip().splitlines()[-1]) if out.strip() else 0
    return best, peak / 1e6, rss_kb / 1e3


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--heap", action="store_true", help="also the peak Python heap (slow)")
    args = ap.parse_args(argv)
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for name, path, run_argv in cases(Path(tmp)):
            rows.append((name, _size(path), *measure(run_argv, args.repeat, args.heap)))
            print(name, "done", file=sys.stderr, flush=True)
    print("| case | bytes | time | Python heap | process RSS |")
    print("|---|---|---|---|---|")
    for name, size, t, heap, rss in rows:
        print(f"| {name} | {size:,} | {t:.2f} s | {heap:.0f} MB | {rss:.0f} MB |")
    own = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1e3
    print(f"\n(this process peaked at {own:.0f} MB, the test boards included)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
