"""Nets of public designs must partition (reference, pin) exactly as their boards do.

Each project in ../shared/realworld carries ``oracle.json``: the nets of the board
built from the schematic. Names differ; the partition of the pins both sides know
must not (zero split and zero merged nets).
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from pullproof.nets import build_circuit

REALWORLD = (Path(__file__).resolve().parents[2] / ".." / "shared" / "realworld").resolve()
PROJECTS = (
    sorted(p.name for p in REALWORLD.iterdir() if (p / "oracle.json").is_file())
    if (REALWORLD.is_dir())
    else []
)

Pin = tuple[str, str]


def _compare(oracle: dict[Pin, str], ours: dict[Pin, str]) -> tuple[list[str], list[str]]:
    """Split and merged nets over the pins both sides know (method of compare_partition)."""
    common = set(oracle) & set(ours)
    o_to_c: dict[str, set[str]] = {}
    c_to_o: dict[str, set[str]] = {}
    for pin in common:
        o_to_c.setdefault(oracle[pin], set()).add(ours[pin])
        c_to_o.setdefault(ours[pin], set()).add(oracle[pin])
    split = sorted(f"{o} -> {sorted(c)}" for o, c in o_to_c.items() if len(c) > 1)
    merged = sorted(f"{c} <- {sorted(o)}" for c, o in c_to_o.items() if len(o) > 1)
    return split, merged


@pytest.mark.skipif(not PROJECTS, reason=f"no real-world corpus at {REALWORLD}")
@pytest.mark.parametrize("project", PROJECTS)
def test_partition_matches_board(project: str) -> None:
    folder = REALWORLD / project
    files = json.loads((folder / "files.json").read_text(encoding="utf-8"))
    oracle_doc = json.loads((folder / "oracle.json").read_text(encoding="utf-8"))
    oracle = {(str(r), str(p)): name for name, pins in oracle_doc["nets"].items() for r, p in pins}
    circuit = build_circuit(folder / files["root_schematic"])
    ours = {(m.ref, m.pin): n.name for n in circuit.nets for m in n.members}
    split, merged = _compare(oracle, ours)
    assert (split, merged) == ([], [])
    assert len(set(oracle) & set(ours)) == len(oracle)  # every board pin is one of ours


EIGHT = {
    "bablokb-buttonbar",
    "buspirate6",
    "dispensy",
    "europi",
    "gekkio-mbctest",
    "openbook-c1",
    "tt-demo",
    "z80-512k",
}


@pytest.mark.skipif(not PROJECTS, reason=f"no real-world corpus at {REALWORLD}")
def test_all_eight_designs_are_checked() -> None:
    assert set(PROJECTS) >= EIGHT


@pytest.mark.skipif(not PROJECTS, reason=f"no real-world corpus at {REALWORLD}")
@pytest.mark.parametrize("project", PROJECTS)
def test_corpus_comparer_agrees(project: str, tmp_path: Path) -> None:
    """The corpus's own comparer (../shared/realworld/compare_partition.py) on our CLI output."""
    folder = REALWORLD / project
    files = json.loads((folder / "files.json").read_text(encoding="utf-8"))
    root = str(folder / files["root_schematic"])
    out = subprocess.run(
        [sys.executable, "-m", "pullproof", "nets", root, "--json"],
        capture_output=True,
        text=True,
        check=True,
    )
    nets = tmp_path / "nets.json"
    nets.write_text(out.stdout, encoding="utf-8")
    compare = [sys.executable, str(REALWORLD / "compare_partition.py")]
    done = subprocess.run(
        [*compare, str(folder / "oracle.json"), str(nets), "-q"], capture_output=True, text=True
    )
    assert done.returncode == 0, done.stdout + done.stderr
