"""Verdicts on the eight public designs with no rules file and no part library.

Parts without data are judged with the input class cmos, rails that state no voltage over
the range their parts accept, outputs without ratings with the open-drain class; each as
a stated assumption (the numbers and their sources are in
src/pullproof/families/data/assumptions/classes.toml: UM10204 and JEDEC JESD7A/JESD8
figures, mostly from memory; USB 2.0 §7.3.2, from memory). With --strict nothing is
assumed and the same networks are incomplete as before assumptions existed. A skeleton
part library written by ``pullproof parts`` loads, and filled with the assumed numbers
(status "user") gives the same verdicts on data, except where a limit resting on an
assumption would fail: an assumption never makes a fail, stated data does.
"""

from __future__ import annotations

import json
from functools import cache
from pathlib import Path

import pytest

from pullproof.families.match import load_part_library
from pullproof.nets import build_circuit
from pullproof.partdata import needs_of
from pullproof.report.parts_out import skeleton_text
from pullproof.results import Basis, ReviewResult, Verdict
from pullproof.review import load_library, review

SHARED = Path(__file__).resolve().parents[2] / ".." / "shared" / "realworld"
DESIGNS = (
    "bablokb-buttonbar", "buspirate6", "dispensy", "europi", "gekkio-mbctest", "openbook-c1",
    "tt-demo", "z80-512k",
)  # fmt: skip

pytestmark = pytest.mark.skipif(
    not all((SHARED / d / "files.json").is_file() for d in DESIGNS),
    reason=f"the eight real-world designs are not present at {SHARED}",
)

# design → (networks, judged other than incomplete by default, incomplete with --strict).
# The --strict counts are those of the review before assumptions existed.
SHARES = {
    "bablokb-buttonbar": (6, 6, 6),
    "buspirate6": (33, 33, 25),
    "dispensy": (8, 8, 4),
    "europi": (3, 3, 3),
    "gekkio-mbctest": (4, 4, 2),
    "openbook-c1": (2, 2, 2),
    "tt-demo": (12, 11, 12),  # the pull on net@C1.2 reaches no input on the schematic
    "z80-512k": (17, 17, 17),
}


def root_of(design: str) -> Path:
    files = json.loads((SHARED / design / "files.json").read_text(encoding="utf-8"))
    return next((SHARED / design).rglob(files["root_schematic"]))


@cache
def reviewed(design: str, assume: str | None = None) -> ReviewResult:
    return review(root_of(design), assume=assume)


@pytest.mark.parametrize("design", DESIGNS)
def test_nine_in_ten_networks_get_a_verdict(design: str) -> None:
    result = reviewed(design)
    total, judged, _ = SHARES[design]
    assert len(result.networks) == total
    done = [n for n in result.networks if n.verdict is not Verdict.INCOMPLETE]
    assert len(done) == judged
    assert len(done) >= 0.9 * total
    for n in result.networks:
        if n.verdict is Verdict.INCOMPLETE:
            # it names exactly what is missing: the first missing value, and how many more
            m = n.missing[0]
            assert n.reason.startswith(f"Cannot judge yet: {m.what} is unknown")
            assert m.hint in n.reason
        else:
            assert n.missing == ()


@pytest.mark.parametrize("design", DESIGNS)
def test_every_assumed_verdict_says_so(design: str) -> None:
    for n in reviewed(design).networks:
        assert (n.basis is Basis.ASSUMED) is bool(n.assumptions)
        assert n.verdict is not Verdict.FAIL or n.basis is Basis.DATA  # never a fail
        for a in n.assumptions:
            assert a.value.source.origin.value == "assumed" and a.fix and a.quantity


@pytest.mark.parametrize("design", DESIGNS)
def test_strict_leaves_the_same_networks_incomplete(design: str) -> None:
    strict = reviewed(design, "none")
    total, _, incomplete = SHARES[design]
    assert len(strict.networks) == total
    assert sum(1 for n in strict.networks if n.verdict is Verdict.INCOMPLETE) == incomplete
    # every network --strict leaves incomplete is one an assumption let the default judge,
    # and no other verdict moves
    default = {n.network.net: n for n in reviewed(design).networks}
    for n in strict.networks:
        if n.verdict is not Verdict.INCOMPLETE:
            assert default[n.network.net].verdict is n.verdict


@pytest.mark.parametrize("design", DESIGNS)
def test_a_filled_skeleton_gives_the_same_verdicts_on_data(design: str, tmp_path: Path) -> None:
    root = root_of(design)
    result = reviewed(design)
    text = skeleton_text(needs_of(result, build_circuit(root), load_library(root, [])), str(root))
    skeleton = tmp_path / "parts.toml"
    skeleton.write_text(text, encoding="utf-8")
    load_part_library(skeleton)  # loads without error as written
    filled = tmp_path / "filled.toml"
    filled.write_text(text.replace('status = "assumed"', 'status = "user"'), encoding="utf-8")
    rules = tmp_path / "pullproof.toml"
    block = text.split("ready to state (remove the leading '# ').\n", 1)
    lines = block[1].split("# Nets whose")[0].splitlines() if len(block) > 1 else []
    rules.write_text("\n".join(ln[2:] for ln in lines if ln.startswith("# ")) + "\n", "utf-8")
    again = {n.network.net: n for n in review(root, parts=[filled], rules=rules).networks}
    assert set(again) == {n.network.net for n in result.networks}
    for before in result.networks:
        after = again[before.network.net]
        assert after.basis is Basis.DATA, (before.network.net, after.assumptions)
        if after.verdict is before.verdict:
            continue
        # the one way they may differ: stated data can fail where the assumption could not
        assert after.verdict is Verdict.FAIL, before.network.net
        rested = [b for b in before.bounds if b.assumed and not b.hard] + [
            c for c in before.checks if c.assumed and c.ok is False
        ]
        assert rested, before.network.net
