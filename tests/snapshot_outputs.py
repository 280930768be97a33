"""Every output of every schematic, normalised, for byte-for-byte comparison across commits.

Not a test (pytest does not collect it). Speed work must change no output; check it so::

    git worktree add ../before <commit before the change>
    python tests/snapshot_outputs.py ../before /tmp/before
    python tests/snapshot_outputs.py . /tmp/after
    diff -r /tmp/before /tmp/after && echo identical

For each ``.kicad_sch`` under ``fixtures/`` of the source tree and under ``../shared/realworld``
(sub-sheets too: their outputs alone must not change either) it runs that tree's own
``pullproof`` (``PYTHONPATH=TREE/src``) for ``review --json``, ``review --json --strict``, the
console ``review``, ``nets --json`` and ``note``, and writes stdout, stderr and the exit code. The
tree's path and dates (the note's date, file times) are replaced by placeholders.
"""

from __future__ import annotations

import argparse
import os
import re
import subprocess
import sys
from pathlib import Path

JOBS = {
    "review.json": ("review", "--json"),
    "strict.json": ("review", "--json", "--strict"),
    "review.txt": ("review",),
    "nets.json": ("nets", "--json"),
}
_DATE = re.compile(r"\d{4}-\d{2}-\d{2}([T ]\d{2}:\d{2}(:\d{2})?(\.\d+)?([+-]\d{2}:?\d{2}|Z)?)?")


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("tree", type=Path, help="a pullproof source tree (a checkout or worktree)")
    ap.add_argument("out", type=Path, help="folder to write the outputs into")
    ap.add_argument("--shared", type=Path, default=Path(__file__).parents[2] / "shared")
    args = ap.parse_args(argv)
    tree, shared = args.tree.resolve(), (args.shared / "realworld").resolve()
    files = sorted((tree / "fixtures").rglob("*.kicad_sch"))
    files += sorted(shared.rglob("*.kicad_sch")) if shared.is_dir() else []
    env = dict(os.environ, PYTHONPATH=str(tree / "src"))
    args.out.mkdir(parents=True, exist_ok=True)

    def norm(text: str) -> str:
        return _DATE.sub("<date>", text.replace(str(tree), "<tree>"))

    def run(*command: str) -> subprocess.CompletedProcess[str]:
        return subprocess.run(
            [sys.executable, "-m", "pullproof", *command], capture_output=True, text=True, env=env
        )

    for f in files:
        tag = str(f).replace(str(tree), "T").replace(str(shared), "S").replace("/", "_")
        for name, command in JOBS.items():
            done = run(*command, str(f))
            text = f"exit {done.returncode}\n{norm(done.stdout)}\n--\n{norm(done.stderr)}"
            (args.out / f"{tag}.{name}").write_text(text, encoding="utf-8")
        note = args.out / f"{tag}.note.html"
        done = run("note", str(f), "-o", str(note))
        if note.exists():
            note.write_text(norm(note.read_text(encoding="utf-8")), encoding="utf-8")
        (args.out / f"{tag}.note.exit").write_text(
            f"exit {done.returncode}\n{norm(done.stderr)}", encoding="utf-8"
        )
    print(f"{len(files)} schematics, {len(files) * (len(JOBS) + 1)} outputs in {args.out}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
