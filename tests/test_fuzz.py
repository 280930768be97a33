"""The fuzz suite: seeded, reproducible cases of damaged and hostile input (``fuzzing.py``).

The normal run is 2 000 cases in batches of 250, in this process. Every case must end with
exit 0, 1 or 2 within its time bound, with no traceback, an error of exactly one line that
names a file, no raw control character on the console, the input files unchanged and no
temporary file left. ``PULLPROOF_FUZZ_CASES`` and ``PULLPROOF_FUZZ_SEED`` change the run;
``python tests/fuzzing.py --cases 50000`` is the long run the README reports.

A few cases also run as separate processes, as a user runs the command.
"""

from __future__ import annotations

import os
import random
import re
import subprocess
import sys
from pathlib import Path

import pytest

from fuzzing import _case, fuzz

CASES = int(os.environ.get("PULLPROOF_FUZZ_CASES", "2000"))
SEED = int(os.environ.get("PULLPROOF_FUZZ_SEED", "20261202"))
BATCH = 250


@pytest.mark.parametrize("start", range(0, CASES, BATCH), ids=lambda s: f"cases {s}+")
def test_fuzz_batch_behaves(start: int) -> None:
    tally = fuzz(min(BATCH, CASES - start), SEED, start)
    shown = "\n".join(f"{case}\n    {problem}" for case, problem in tally.failures[:10])
    assert tally.failures == [], f"{len(tally.failures)} bad cases:\n{shown}"
    assert tally.cases == min(BATCH, CASES - start)
    assert sum(tally.exits.values()) == tally.cases and set(tally.exits) <= {0, 1, 2}


@pytest.mark.parametrize("index", range(6))
def test_fuzz_case_as_a_separate_process(index: int, tmp_path: Path) -> None:
    rng = random.Random(f"process:{SEED}:{index}")
    folder = tmp_path / "case"
    folder.mkdir()
    root, extra = _case(rng, folder, [])
    command = ["nets", "review", "annotate"][index % 3]
    proc = subprocess.run(
        [sys.executable, "-m", "pullproof", command, root, *extra],
        capture_output=True, text=True, timeout=120,
    )  # fmt: skip
    assert proc.returncode in (0, 1, 2), proc.stderr
    assert "Traceback" not in proc.stderr + proc.stdout
    if proc.returncode == 2:
        assert proc.stderr.count("\n") == 1, proc.stderr
        assert str(folder) in proc.stderr or re.match(r"(pullproof: )?/", proc.stderr)
