"""A seeded, reproducible fuzz run of the CLI on damaged and hostile input.

Each case takes a source project (the connectivity fixtures, the demo, the review fixture,
or a slice of a real design in ``../shared/realworld``), damages it with a few seeded
mutations (truncation, deleted, duplicated and swapped nodes, hostile numbers and strings,
Unicode and control characters, raw bytes, broken rules and part libraries) or builds one
of the directed hostile cases (sheet files that are FIFOs, devices, links out of the
folder or secrets; overflowing coordinates, wires across the whole range, absurd vectors,
impossible rules), then runs one command in this process within a time bound and checks:

* the exit code is 0, 1 or 2 — never 3, never an exception escaping ``main``;
* an error is exactly one line and names a file;
* no raw control character or bidi mark reaches stdout or stderr;
* the input files are byte-identical afterwards (unless ``annotate --write`` succeeded)
  and no temporary file is left.

Case ``i`` of seed ``s`` is always the same case. Run from the shell for a long run::

    python tests/fuzzing.py --cases 50000 --seed 1
"""

from __future__ import annotations

import argparse
import collections
import os
import random
import re
import shutil
import sys
import tempfile
import time
from dataclasses import dataclass, field
from functools import cache
from pathlib import Path

HERE = Path(__file__).resolve().parent
if str(HERE) not in sys.path:
    sys.path.insert(0, str(HERE))

from conftest import CONNECTIVITY, FIXTURES, REALWORLD  # noqa: E402
from hostile import Hang, digests, raw_controls, run  # noqa: E402

__all__ = ["Tally", "fuzz"]

CASE_SECONDS = 20.0  # a case not answered by then counts as a hang

# Text a damaged or hostile file may hold. Numbers at and past the edges of floats and of
# the sheet, control characters (C0, DEL, C1 with CSI), bidi marks, separators, markup.
HOSTILE_NUMBERS = ["1e308", "-1e308", "1e309", "1e-320", "0", "-0", "nan", "inf", "-inf",
                   "99999999999999999999999", "1e15", "20000", "-20000", "0x10", "1_000",
                   "4" * 5000, ".", "-", "1e", "3.3.3"]  # fmt: skip
HOSTILE_TEXT = ["\x1b[2J", "\x07", "\r", "\x08", "\x9b31m", "\u202e", "\u2066", "\u2028",
                "\x00", "\ufeff", "\U0001f4a5", "{slash}", "{", "}", "~{RST}", "\\", '\\"',
                "A[0..99999999]", "{D[0..7] CLK}", "../../etc/passwd", "/dev/zero", "",
                "x" * 3000, "Ω", "µ", "ppm/K", "%", "10k 150%", "0W", "-5V", "1e308V",
                "VDD+1e308V", "1.7 VDD"]  # fmt: skip
NOISE = ["(", ")", "((", "))", '"', " ", "\n", "\t", "(kicad_sch", "(symbol", "(wire",
         "(at 0 0)", "(pts (xy 0 0) (xy 1e308 0))", "(label \"N\" (at 1 1 0))",
         "(junction (at 0 0))", "(property \"Sheetfile\" \"x.kicad_sch\")"]  # fmt: skip
TOML_VALUES = ['"0%"', '"150%"', '"-1V"', '"1e308V"', '"nan"', "5", "true", "[1, 2]", '["E24"]',
               "{}", '"1.7 VDD"', '"abc"', '""', '"-273.16°C"', '"1e20°C"', '"VDD"',
               '["3V", "2V"]', '"0W"', '"\x1b[2J"', "nan", "-inf"]  # fmt: skip
COMMANDS = ["nets"] * 9 + ["review"] * 8 + ["annotate"] * 2 + ["annotate --write", "note"]

_NUMBER = re.compile(r"(?<=[\s(])-?\d+(?:\.\d+)?(?:e[+-]?\d+)?(?=[\s)])")
_STRING = re.compile(r'"(?:[^"\\]|\\.)*"')
_TOML_VALUE = re.compile(r"(?m)^(\s*[\w.\"-]+\s*=\s*)(.+)$")


@dataclass(frozen=True)
class Project:
    """A source: its files (name → text) and which one is the root."""

    name: str
    files: tuple[tuple[str, str], ...]
    root: str


@dataclass
class Tally:
    """What a run found; ``failures`` holds (case, what went wrong) for every bad case."""

    cases: int = 0
    exits: collections.Counter[int] = field(default_factory=collections.Counter)
    kinds: collections.Counter[str] = field(default_factory=collections.Counter)
    failures: list[tuple[str, str]] = field(default_factory=list)
    seconds: float = 0.0
    slowest: float = 0.0

    def counts(self) -> dict[str, int]:
        bad = collections.Counter(what.split(":")[0] for _, what in self.failures)
        return {
            "cases": self.cases,
            "exit 0": self.exits[0],
            "exit 1": self.exits[1],
            "exit 2": self.exits[2],
            "exit 3": self.exits[3],
            "tracebacks": bad["traceback"],
            "hangs": bad["hang"],
            "errors without a file name": bad["nameless"],
            "errors of more than one line": bad["lines"],
            "raw control characters shown": bad["controls"],
            "input files changed": bad["changed"],
            "temporary files left": bad["temporary"],
        }


# ------------------------------------------------------------------ sources


@cache
def _small_projects() -> tuple[Project, ...]:
    out = []
    for path in sorted(CONNECTIVITY.glob("*.kicad_sch")):
        out.append(Project(path.stem, ((path.name, path.read_text("utf-8")),), path.name))
    for folder in sorted(p for p in CONNECTIVITY.iterdir() if p.is_dir()):
        files = tuple((p.name, p.read_text("utf-8")) for p in sorted(folder.glob("*.kicad_sch")))
        roots = [n for n, t in files if "(sheet " in t] or [files[0][0]]
        out.append(Project(folder.name, files, roots[0]))
    return tuple(out)


@cache
def _whole(folder: Path, root: str) -> Project:
    files = tuple(
        (p.name, p.read_text("utf-8"))
        for p in sorted(folder.iterdir())
        if p.suffix in (".kicad_sch", ".toml")
    )
    return Project(folder.name, files, root)


@cache
def _realworld_files() -> tuple[tuple[str, str], ...]:
    if not REALWORLD.is_dir():
        return ()
    return tuple((p.name, p.read_text("utf-8")) for p in sorted(REALWORLD.glob("*/*.kicad_sch")))


_TOKENS = re.compile(r'"(?:[^"\\]|\\.)*"|\((?P<head>[^\s()"]*)|\)')


@cache
def _nodes(text: str) -> tuple[list[tuple[int, int, str]], dict[str, tuple[int, int]]]:
    """Top-level nodes (start, end, head) of a real file and its library symbols by name."""
    top: list[tuple[int, int, str]] = []
    libs: dict[str, tuple[int, int]] = {}
    stack: list[tuple[int, str]] = []
    for m in _TOKENS.finditer(text):
        tok = m.group()
        if tok[0] == "(":
            stack.append((m.start(), m.group("head")))
        elif tok == ")" and stack:
            start, head = stack.pop()
            if len(stack) == 1:
                top.append((start, m.end(), head))
            elif len(stack) == 2 and stack[1][1] == "lib_symbols" and head == "symbol":
                name = re.match(r'\(symbol\s+"((?:[^"\\]|\\.)*)"', text[start : start + 300])
                if name:
                    libs[name.group(1)] = (start, m.end())
    return top, libs


def _slice_of_real_design(rng: random.Random) -> Project:
    """A single-file schematic made of a few dozen nodes of a real design and the library
    symbols they use (the real design's other nodes dropped)."""
    name, text = rng.choice(_realworld_files())
    top, libs = _nodes(text)
    body = [t for t in top if t[2] not in ("lib_symbols", "sheet", "sheet_instances")]
    start = rng.randrange(max(1, len(body) - 40))
    chosen = body[start : start + rng.randint(5, 40)]
    used = {m for s, e, _ in chosen for m in re.findall(r'\(lib_id "([^"]+)"', text[s:e])}
    lib_text = "".join(text[libs[u][0] : libs[u][1]] + "\n" for u in sorted(used) if u in libs)
    head = "".join(text[s:e] + "\n" for s, e, h in top if h in ("version", "generator", "uuid"))
    nodes = "".join(text[s:e] + "\n" for s, e, _ in chosen)
    sliced = f"(kicad_sch\n{head}(lib_symbols\n{lib_text})\n{nodes})\n"
    return Project(f"slice of {name}", (("slice.kicad_sch", sliced),), "slice.kicad_sch")


def _source(rng: random.Random) -> Project:
    roll = rng.random()
    if roll < 0.10 and _realworld_files():
        return _slice_of_real_design(rng)
    if roll < 0.14:
        return _whole(FIXTURES / "demo", "irrigation.kicad_sch")
    if roll < 0.16:
        return _whole(FIXTURES / "review", "interlock_panel.kicad_sch")
    return rng.choice(_small_projects())


# ------------------------------------------------------------------ mutations


def _spans(text: str) -> list[tuple[int, int]]:
    """Spans of balanced lists in ``text`` (strings skipped; unbalanced parts ignored)."""
    spans: list[tuple[int, int]] = []
    stack: list[int] = []
    for m in _TOKENS.finditer(text):
        if m.group()[0] == "(":
            stack.append(m.start())
        elif m.group() == ")" and stack:
            spans.append((stack.pop(), m.end()))
    return spans


def _mutate_schematic(text: str, rng: random.Random, log: list[str]) -> str:
    op = rng.choice(["truncate", "delete", "duplicate", "insert", "drop node", "dup node",
                     "swap nodes", "number", "string", "unicode", "swap tokens"])  # fmt: skip
    log.append(op)
    if not text:
        return text
    i = rng.randrange(len(text))
    if op == "truncate":
        return text[:i]
    if op == "delete":
        return text[:i] + text[i + rng.randint(1, 200) :]
    if op == "duplicate":
        return text[:i] + text[i : i + rng.randint(1, 400)] + text[i:]
    if op == "insert":
        return text[:i] + rng.choice(NOISE + HOSTILE_TEXT) + text[i:]
    if op == "unicode":
        cp = rng.choice(
            [
                rng.randrange(0x20, 0x3000),
                rng.randrange(0x80, 0xA0),
                rng.randrange(0x2000, 0x2070),
                rng.randrange(0x10000, 0x110000),
            ]
        )
        return text[:i] + chr(cp if not 0xD800 <= cp < 0xE000 else 0xFFFD) + text[i:]  # fmt: skip
    if op == "swap tokens":
        tokens = text.split(" ")
        a, b = rng.randrange(len(tokens)), rng.randrange(len(tokens))
        tokens[a], tokens[b] = tokens[b], tokens[a]
        return " ".join(tokens)
    if op == "number":
        found = list(_NUMBER.finditer(text))
        if found:
            m = rng.choice(found)
            return text[: m.start()] + rng.choice(HOSTILE_NUMBERS) + text[m.end() :]
        return text
    if op == "string":
        found = list(_STRING.finditer(text))
        if found:
            m = rng.choice(found)
            value = rng.choice(HOSTILE_TEXT)
            if rng.random() < 0.5:
                value = m.group()[1:-1] + value
            quoted = '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
            return text[: m.start()] + quoted + text[m.end() :]
        return text
    spans = [s for s in _spans(text) if s[0] > 0]
    if not spans:
        return text
    s, e = rng.choice(spans)
    if op == "drop node":
        return text[:s] + text[e:]
    if op == "dup node":
        return text[:e] + " " + text[s:e] + text[e:]
    s2, e2 = rng.choice(spans)  # swap two disjoint nodes
    if e <= s2 or e2 <= s:
        (a0, a1), (b0, b1) = sorted([(s, e), (s2, e2)])
        return text[:a0] + text[b0:b1] + text[a1:b0] + text[a0:a1] + text[b1:]
    return text


def _mutate_toml(text: str, rng: random.Random, log: list[str]) -> str:
    found = list(_TOML_VALUE.finditer(text))
    if not found or rng.random() < 0.2:
        log.append("toml bytes")
        i = rng.randrange(len(text) + 1)
        return (
            text[:i] + rng.choice(["[", "]", "=", '"', "\n[part.X]\n", "\xff", "\x1b"]) + text[i:]
        )
    m = rng.choice(found)
    log.append(f"toml {m.group(1).strip()}")
    return text[: m.start(2)] + rng.choice(TOML_VALUES) + text[m.end(2) :]


# ------------------------------------------------------------------ directed cases


def _directed(rng: random.Random, folder: Path, log: list[str]) -> tuple[str, list[str]]:
    """One of the hostile cases the issue names, in a fresh copy of a small project."""
    project = rng.choice([p for p in _small_projects() if len(p.files) > 1])
    for name, text in project.files:
        (folder / name).write_text(text, encoding="utf-8")
    root = folder / project.root
    sheets = re.findall(r'"Sheet ?file" "([^"]+)"', root.read_text("utf-8"))
    kind = rng.choice(["fifo", "folder", "loop", "device", "environ", "passwd", "dotdot",
                       "long name", "far", "diagonal", "vector", "rail", "derating",
                       "instances", "secret"])  # fmt: skip
    log.append(f"directed {kind}")
    extra: list[str] = []
    text = root.read_text("utf-8")
    sheet = folder / sheets[0] if sheets else None

    def retarget(target: str) -> None:
        root.write_text(text.replace(f'"{sheets[0]}"', f'"{target}"', 1), "utf-8")

    if kind in ("fifo", "folder", "loop") and sheet is not None:
        sheet.unlink()
        {"fifo": os.mkfifo, "folder": os.mkdir, "loop": lambda p: os.symlink(p.name, p)}[kind](
            sheet
        )
    elif kind == "device" and sheets:
        retarget(rng.choice(["/dev/zero", "/dev/urandom", "/dev/null"]))
        extra.append("--allow-outside")
    elif kind in ("environ", "passwd") and sheets:
        retarget("/proc/self/environ" if kind == "environ" else "/etc/passwd")
        if rng.random() < 0.5:
            extra.append("--allow-outside")
    elif kind == "dotdot" and sheets:
        retarget("../" * rng.randint(1, 5) + sheets[0])
    elif kind == "long name" and sheets:
        retarget("y" * rng.choice([255, 256, 4096, 10000]))
    elif kind == "secret" and sheets:
        (folder / ".env").write_text("TOKEN=hive-42\n", "utf-8")
        retarget(".env")
    elif kind in ("far", "diagonal", "vector"):
        items = {
            "far": f"(wire (pts (xy {rng.choice(HOSTILE_NUMBERS)} 0) (xy 1 1)))",
            "diagonal": "(wire (pts (xy -10000 -10000) (xy 10000 10000)))"
            ' (wire (pts (xy -10000 10000) (xy 10000 -10000))) (label "X" (at 0 0 0))',
            "vector": f'(label "B[0..{rng.choice([4096, 10**6, 10**12])}]" (at 1 1 0))',
        }[kind]
        root.write_text(text.rstrip()[:-1] + items + ")\n", "utf-8")
    elif kind in ("rail", "derating"):
        rules = {"rail": '[rails]\nVIN = "1e308V"\n', "derating": 'derating = "0%"\n'}[kind]
        (folder / "pullproof.toml").write_text(rules, "utf-8")
    elif kind == "instances":
        blocks = "".join(
            f'(sheet (at 0 0) (uuid "u{i}") (property "Sheetname" "S{i}")'
            f' (property "Sheetfile" "{project.root}"))'
            for i in range(3)
        )
        (folder / "loop.kicad_sch").write_text(f"(kicad_sch {blocks})", "utf-8")
        return str(folder / "loop.kicad_sch"), extra
    return str(root), extra


# ------------------------------------------------------------------ one case


def _case(rng: random.Random, folder: Path, log: list[str]) -> tuple[str, list[str]]:
    """Write the case's files into ``folder``; return the root and extra options."""
    if rng.random() < 0.1:
        return _directed(rng, folder, log)
    project = _source(rng)
    log.append(project.name)
    files = dict(project.files)
    schematics = [n for n in files if n.endswith(".kicad_sch")]
    tomls = [n for n in files if n.endswith(".toml")]
    for _ in range(rng.randint(1, 4)):
        if tomls and rng.random() < 0.25:
            name = rng.choice(tomls)
            files[name] = _mutate_toml(files[name], rng, log)
        else:
            name = rng.choice(schematics)
            files[name] = _mutate_schematic(files[name], rng, log)
    for name, text in files.items():
        data = text.encode("utf-8", errors="surrogatepass")
        if rng.random() < 0.03:  # raw bytes: not UTF-8, a byte-order mark, CRLF
            i = rng.randrange(len(data) + 1)
            data = (
                data[:i] + rng.choice([b"\xff\xfe", b"\x80", b"\xef\xbb\xbf", b"\r\n"]) + data[i:]
            )
            log.append(f"bytes in {name}")
        (folder / name).write_bytes(data)
    return str(folder / project.root), []


def _check(code: int, out: str, err: str, folder: Path) -> str:
    """'' when the case behaved; else what went wrong."""
    if code not in (0, 1, 2):
        return f"exit {code}: {err.strip()[:300]}"
    if "Traceback" in out + err:
        return f"traceback: {err[:300]}"
    if raw_controls(out + err):
        return f"controls: {raw_controls(out + err)!r}"
    if code == 2:
        if err.count("\n") != 1 or not err.endswith("\n"):
            return f"lines: {err[:300]!r}"
        if str(folder) not in err and not re.match(r"(pullproof: )?/\w", err):
            return f"nameless: {err.strip()[:300]}"
    return ""


def one_case(seed: int, index: int, workdir: Path) -> tuple[str, int, str]:
    """Run case ``index`` of ``seed`` in ``workdir``: (description, exit code, problem)."""
    rng = random.Random(f"{seed}:{index}")
    folder = workdir / f"case{index}"
    folder.mkdir()
    log: list[str] = []
    note = folder.parent / f"note{index}.html"  # outside the case's files
    try:
        root, extra = _case(rng, folder, log)
        command = rng.choice(COMMANDS).split()
        if command[0] == "note":
            extra += ["-o", str(note)]
        log.append(" ".join(command + extra))
        before = digests(folder)
        try:
            code, out, err = run(command[0], root, *command[1:], *extra, seconds=CASE_SECONDS)
        except Hang as exc:
            return "; ".join(log), -1, f"hang: {exc}"
        except BaseException as exc:  # anything escaping main is a traceback for a user
            return "; ".join(log), -1, f"traceback: {type(exc).__name__}: {exc}"
        problem = _check(code, out, err, folder)
        after = digests(folder)
        if not problem and any(name.endswith(".tmp") for name in after):
            problem = f"temporary: {sorted(after)}"
        if not problem and after != before and not (command[-1] == "--write" and code == 0):
            problem = "changed: " + ", ".join(n for n in after if after[n] != before.get(n))
        return "; ".join(log), code, problem
    finally:
        shutil.rmtree(folder, ignore_errors=True)
        note.unlink(missing_ok=True)


def fuzz(cases: int, seed: int, start: int = 0, tally: Tally | None = None) -> Tally:
    """Run cases ``start`` … ``start + cases - 1`` of ``seed``."""
    tally = tally or Tally()
    t0 = time.perf_counter()
    with tempfile.TemporaryDirectory(prefix="pullproof-fuzz-") as tmp:
        for index in range(start, start + cases):
            t1 = time.perf_counter()
            what, code, problem = one_case(seed, index, Path(tmp))
            tally.slowest = max(tally.slowest, time.perf_counter() - t1)
            tally.cases += 1
            tally.exits[code] += 1
            tally.kinds[what.split(";")[0]] += 1
            if problem:
                tally.failures.append((f"seed {seed} case {index}: {what}", problem))
    tally.seconds += time.perf_counter() - t0
    return tally


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description="a long fuzz run of pullproof")
    ap.add_argument("--cases", type=int, default=50_000)
    ap.add_argument("--seed", type=int, default=1)
    args = ap.parse_args(argv)
    tally = Tally()
    step = 1000
    for start in range(0, args.cases, step):
        fuzz(min(step, args.cases - start), args.seed, start, tally)
        print(f"{tally.cases} cases, {len(tally.failures)} failures, {tally.seconds:.0f} s",
              file=sys.stderr, flush=True)  # fmt: skip
    print(f"seed {args.seed}: {tally.seconds:.0f} s, slowest case {tally.slowest:.1f} s")
    for key, value in tally.counts().items():
        print(f"| {key} | {value:,} |")
    for case, problem in tally.failures[:50]:
        print(f"{case}\n    {problem}")
    return 1 if tally.failures else 0


if __name__ == "__main__":
    sys.exit(main())
