"""The command line: a thin shell over the library.

Each subcommand parses its options, calls the library, prints a report, and
returns an exit code. Errors the user can cause are :class:`PullproofError`
subclasses and print as one line; anything else is an internal error (exit 3),
also printed as one line. Everything printed passes through
:func:`~pullproof.report.safe_text.for_terminal`: a schematic's control characters
and bidi marks reach the console only as escapes.
"""

from __future__ import annotations

import argparse
import contextlib
import functools
import signal
import sys
from collections.abc import Callable, Iterator, Sequence
from typing import TYPE_CHECKING

from . import __version__
from .errors import EXIT_FINDINGS, EXIT_INPUT, EXIT_INTERNAL, PullproofError
from .heap import few_collections
from .limits import DEFAULT_MAX_FILE_BYTES, DEFAULT_MAX_TOTAL_BYTES, InputPolicy
from .report.safe_text import for_terminal, json_text, write_json_safely

__all__ = ["main"]

if TYPE_CHECKING:
    from .circuit import Circuit
    from .results import ReviewResult
    from .schematic.hierarchy import Hierarchy

Handler = Callable[[argparse.Namespace], int]
_MAX_ERROR_CHARS = 400  # an error is one readable line, whatever text it quotes


def _out(text: str) -> None:
    """Print a report (its own newlines kept, every other control character escaped)."""
    sys.stdout.write(for_terminal(text))


def _policy(args: argparse.Namespace) -> InputPolicy:
    return InputPolicy(
        max_file_bytes=round(args.max_file_size * 1e6),
        max_total_bytes=round(args.max_total_size * 1e6),
        allow_outside=args.allow_outside,
    )


def _cmd_nets(args: argparse.Namespace) -> int:
    from .nets import build_circuit
    from .report.nets_out import nets_json, nets_table

    circuit = build_circuit(args.root, _policy(args))
    _out(json_text(nets_json(circuit)) + "\n" if args.json else nets_table(circuit))
    return 0


def _cmd_families(args: argparse.Namespace) -> int:
    from .families.report import families_json, families_table

    _out(json_text(families_json()) + "\n" if args.json else families_table())
    return 0


_FAIL_ON = {"marginal": 1, "incomplete": 2, "fail": 3}


def _review_from(
    args: argparse.Namespace, circuit: Circuit | None = None, hierarchy: Hierarchy | None = None
) -> ReviewResult:
    from dataclasses import replace

    from .compare import compare_reviews
    from .review import Selection, parse_ref_list, parse_where, review

    select = Selection(
        refs=parse_ref_list(args.ref) if args.ref else None,
        where=parse_where(args.where or ()),
    )
    policy = _policy(args)
    assume = "none" if getattr(args, "strict", False) else None  # --strict: no stand-in
    result = review(
        args.root,
        rules=args.rules,
        parts=args.parts or (),
        select=select,
        circuit=circuit,
        hierarchy=hierarchy,
        policy=policy,
        assume=assume,
    )
    against = getattr(args, "against", None)
    if against:
        # The older revision is judged by the same explicit --rules/--parts when given, else
        # by the files beside it, as they were in that revision.
        old = review(
            against, rules=args.rules, parts=args.parts or (), select=select, policy=policy,
            assume=assume,
        )  # fmt: skip
        result = replace(result, changes=compare_reviews(result, old))
    return result


def _cmd_review(args: argparse.Namespace) -> int:
    from .nets import circuit_from_hierarchy
    from .report.console import review_table
    from .report.review_json import review_json
    from .report.sarif import sarif_log
    from .schematic.hierarchy import load_hierarchy
    from .textfile import write_report

    hierarchy = load_hierarchy(args.root, _policy(args))  # read once: the SARIF log needs the
    circuit = circuit_from_hierarchy(hierarchy, args.root)  # circuit, the review both
    result = _review_from(args, circuit, hierarchy)
    if args.sarif:
        write_report(args.sarif, json_text(sarif_log(result, circuit)) + "\n", "SARIF log",
                     result.inputs)  # fmt: skip
    if args.json:
        # streamed, not built as one string: with every candidate's operating point a large
        # board's document is tens of megabytes
        write_json_safely(review_json(result, streamed=True), sys.stdout.write)
        sys.stdout.write("\n")
    else:
        _out(review_table(result))
    return EXIT_FINDINGS if _gate_fails(result, args) else 0


def _gate_fails(result: ReviewResult, args: argparse.Namespace) -> bool:
    """``--fail-on``: a result that counts is at least this bad (an assumed verdict counts
    as its verdict; it is never a fail). ``--require-data``: a result that counts rests on
    an assumed value."""
    return result.gate.rank >= _FAIL_ON[args.fail_on] or (
        bool(args.require_data) and result.assumed > 0
    )


def _cmd_gate(args: argparse.Namespace) -> int:
    from .report.console import review_table
    from .roots import roots_of

    roots = roots_of(args.files)
    if not roots:
        _out("pullproof gate: no schematic among the given files; nothing to review\n")
        return 0
    code = 0
    for root in roots:
        one = argparse.Namespace(**vars(args), root=str(root), ref=None, where=None)
        result = _review_from(one)
        _out(review_table(result) + "\n")
        if _gate_fails(result, args):
            code = EXIT_FINDINGS
    return code


def _cmd_note(args: argparse.Namespace) -> int:
    from pathlib import Path

    from .report.note import write_note

    result = _review_from(args)
    title = args.title or f"Pull resistor design note: {Path(args.root).stem}"
    write_note(result, Path(args.output), title=title, author=args.author or "")
    _out(f"wrote {args.output} ({len(result.networks)} networks, worst: {result.worst.value})\n")
    return 0


def _cmd_demo(args: argparse.Namespace) -> int:
    from collections import Counter

    from .demo import write_demo

    out = write_demo(args.dir, force=args.force)
    lines = [f"wrote the demo project to {out.root.parent}:"]
    lines += [f"  {path}" for path in out.files]
    tally = Counter(r.verdict for r in out.result.networks)
    counts = ", ".join(f"{v.value} {tally[v]}" for v in sorted(tally, key=lambda v: v.rank))
    lines.append(
        f"wrote the design note {out.note} ({len(out.result.networks)} networks: {counts})"
    )
    lines.append(
        f"open the note in a browser; review the demo again with: pullproof review {out.root}"
    )
    _out("\n".join(lines) + "\n")
    return 0


def _cmd_annotate(args: argparse.Namespace) -> int:
    from .annotate import apply_annotation, format_plan, plan_annotation
    from .review import Selection, parse_ref_list, parse_where

    select = Selection(
        refs=parse_ref_list(args.ref) if args.ref else None,
        where=parse_where(args.where or ()),
    )
    plan = plan_annotation(
        args.root,
        rules=args.rules,
        parts=args.parts or (),
        select=select,
        policy=_policy(args),
        remove=args.remove,
        assume="none" if args.strict else None,
    )
    if args.write:
        apply_annotation(plan, backup=args.backup)
    _out(format_plan(plan, written=args.write))
    return 0


def _cmd_parts(args: argparse.Namespace) -> int:
    from pathlib import Path

    from .nets import circuit_from_hierarchy
    from .partdata import needs_of
    from .report.parts_out import parts_listing, write_skeleton
    from .review import load_library
    from .schematic.hierarchy import load_hierarchy

    hierarchy = load_hierarchy(args.root, _policy(args))
    circuit = circuit_from_hierarchy(hierarchy, args.root)
    result = _review_from(args, circuit, hierarchy)
    library = load_library(Path(args.root), [Path(p) for p in args.parts or ()])
    needs = needs_of(result, circuit, library)
    if args.write:  # written first: a file that cannot be written stops before any listing
        write_skeleton(needs, args.write, force=args.force, inputs=result.inputs, root=args.root)
    _out(parts_listing(needs))
    if args.write:
        _out(f"wrote the part-library skeleton {args.write} ({len(needs.entries)} parts)\n")
    return 0


def _strict_option(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--strict",
        action="store_true",
        help="assume nothing: inputs, rails and drivers without data stay incomplete "
        '(as with assume = "none" in the rules)',
    )


def _gate_options(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--fail-on",
        choices=sorted(_FAIL_ON, key=_FAIL_ON.__getitem__),
        default="fail",
        help="exit 1 when any verdict or finding that is not accepted is at least this bad "
        "(default: fail; a verdict resting on an assumption counts as its verdict and is "
        "never a fail)",
    )
    p.add_argument(
        "--require-data",
        action="store_true",
        help="also exit 1 while any verdict or finding that is not accepted rests on an "
        "assumed value",
    )


def _megabytes(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        value = float("nan")
    if not 0 < value <= 1e6:  # also refuses nan
        raise argparse.ArgumentTypeError(f"expected a size in MB above 0, got {text!r}")
    return value


def _limit_options(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--allow-outside",
        action="store_true",
        help="read sheet files given by absolute paths or outside the root's folder",
    )
    p.add_argument(
        "--max-file-size", metavar="MB", type=_megabytes, default=DEFAULT_MAX_FILE_BYTES / 1e6,
        help=f"refuse a schematic file above this size (default {DEFAULT_MAX_FILE_BYTES / 1e6:g})",
    )  # fmt: skip
    p.add_argument(
        "--max-total-size", metavar="MB", type=_megabytes,
        default=DEFAULT_MAX_TOTAL_BYTES / 1e6,
        help=f"refuse schematic files above this size in all "
        f"(default {DEFAULT_MAX_TOTAL_BYTES / 1e6:g})",
    )  # fmt: skip


def _selection_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("root", help="root schematic file (.kicad_sch)")
    _limit_options(p)
    p.add_argument(
        "--rules", metavar="FILE", help="rules file (default: pullproof.toml beside ROOT)"
    )
    p.add_argument(
        "--parts",
        metavar="FILE",
        action="append",
        help="part-library file, may repeat (default: pullproof-parts.toml beside ROOT)",
    )
    p.add_argument("--ref", metavar="REFS", help="judge only these resistors, e.g. R3,R7-R12")
    p.add_argument(
        "--where",
        metavar="FIELD=VALUE",
        action="append",
        help="judge only resistors whose FIELD matches VALUE (glob); may repeat",
    )
    _strict_option(p)


def _against_option(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--against",
        metavar="OLD",
        help="also review OLD (the root schematic of an older revision) and report what changed",
    )


@functools.cache  # built once: a parser is not changed by parsing
def _build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="pullproof",
        description="Check pull-up and pull-down resistors against worst-case limits.",
    )
    parser.add_argument("--version", action="version", version=f"pullproof {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)

    p = sub.add_parser("nets", help="list the nets of a schematic (root plus sub-sheets)")
    p.add_argument("root", help="root schematic file (.kicad_sch)")
    _limit_options(p)
    p.add_argument("--json", action="store_true", help="print the pullproof.nets/1 JSON document")
    p.set_defaults(handler=_cmd_nets)

    p = sub.add_parser("families", help="list the built-in logic families with their sources")
    p.add_argument("--json", action="store_true", help="print the pullproof.families/1 JSON")
    p.set_defaults(handler=_cmd_families)

    p = sub.add_parser("review", help="judge every pull-up and pull-down resistor")
    _selection_options(p)
    _against_option(p)
    p.add_argument("--json", action="store_true", help="print the pullproof.review/2 JSON document")
    _gate_options(p)
    p.add_argument(
        "--sarif",
        metavar="FILE",
        help="also write the results as a SARIF 2.1.0 log (for code-review and CI tools)",
    )
    p.set_defaults(handler=_cmd_review)

    p = sub.add_parser(
        "gate",
        help="review the root schematics of changed files (for commit hooks and CI)",
    )
    p.add_argument("files", nargs="*", metavar="FILE", help="changed files (.kicad_sch)")
    p.add_argument("--rules", metavar="FILE", help="rules file (default: beside each root)")
    p.add_argument("--parts", metavar="FILE", action="append", help="part-library file")
    _limit_options(p)
    _gate_options(p)
    _strict_option(p)
    p.set_defaults(handler=_cmd_gate)

    p = sub.add_parser("note", help="write the HTML design note")
    _selection_options(p)
    _against_option(p)
    p.add_argument("-o", "--output", required=True, metavar="NOTE.html", help="file to write")
    p.add_argument("--title", help="title of the note")
    p.add_argument("--author", help="author named in the note")
    p.set_defaults(handler=_cmd_note)

    p = sub.add_parser("annotate", help="write the review results into the schematic as fields")
    _selection_options(p)
    p.add_argument(
        "--write",
        action="store_true",
        help="modify the schematic files (default: only list the fields that would change)",
    )
    p.add_argument(
        "--remove",
        action="store_true",
        help="take the result fields out again (with --write: the files as before annotate)",
    )
    p.add_argument("--backup", action="store_true", help="with --write, keep FILE.bak")
    p.set_defaults(handler=_cmd_annotate)

    p = sub.add_parser(
        "parts",
        help="list, per part, the datasheet numbers the review lacks or assumes; write a "
        "part-library skeleton",
    )
    _selection_options(p)
    p.add_argument(
        "--write",
        metavar="FILE",
        help="write a part-library skeleton (TOML) to FILE, ready to edit",
    )
    p.add_argument("--force", action="store_true", help="overwrite FILE when it exists")
    p.set_defaults(handler=_cmd_parts)

    p = sub.add_parser("demo", help="write the demo project and its design note into a folder")
    p.add_argument(
        "dir", nargs="?", default="pullproof-demo", metavar="DIR",
        help="folder to write into (default: ./pullproof-demo; created when missing)",
    )  # fmt: skip
    p.add_argument("--force", action="store_true", help="overwrite demo files from an earlier run")
    p.set_defaults(handler=_cmd_demo)

    return parser


class _Interrupted(KeyboardInterrupt):
    """A termination signal, raised so that clean-up code (``finally``) runs."""

    def __init__(self, signum: int) -> None:
        super().__init__(signum)
        self.signum = signum


@contextlib.contextmanager
def _signals_interrupt() -> Iterator[None]:
    """While running, SIGTERM and SIGHUP interrupt like Ctrl-C: writes are rolled back."""

    def handler(signum: int, frame: object) -> None:
        raise _Interrupted(signum)

    saved = {}
    try:
        for sig in (getattr(signal, "SIGTERM", None), getattr(signal, "SIGHUP", None)):
            if sig is not None:
                saved[sig] = signal.signal(sig, handler)
    except ValueError:  # not the main thread: signals stay as they are
        pass
    try:
        yield
    finally:
        for sig, old in saved.items():
            signal.signal(sig, old)


def _error(text: str) -> None:
    """One line on stderr: newlines joined, control characters escaped, length capped."""
    line = for_terminal(" ".join(text.splitlines()), keep="")
    if len(line) > _MAX_ERROR_CHARS:
        line = line[: _MAX_ERROR_CHARS - 1] + "…"
    print(line, file=sys.stderr)


def main(argv: Sequence[str] | None = None) -> int:
    """Run pullproof with ``argv`` (default: ``sys.argv[1:]``) and return the exit code."""
    parser = _build_parser()
    args = parser.parse_args(argv)
    handler: Handler = args.handler
    with contextlib.suppress(AttributeError, ValueError):  # never fail on an odd stdout
        sys.stdout.reconfigure(errors="backslashreplace")  # type: ignore[union-attr]
    try:
        with _signals_interrupt(), few_collections():
            return handler(args)
    except PullproofError as exc:
        # Positioned errors already read FILE:LINE:COL: …; others get the program name.
        _error(str(exc) if exc.location is not None else f"pullproof: {exc}")
        return exc.exit_code
    except BrokenPipeError:
        return 0
    except KeyboardInterrupt as exc:
        _error("pullproof: interrupted; nothing was left half-written")
        return 128 + exc.signum if isinstance(exc, _Interrupted) else 130
    except RecursionError:
        _error(f"pullproof: {getattr(args, 'root', '')}: input nested too deeply to process")
        return EXIT_INPUT
    except Exception as exc:
        _error(f"pullproof: internal error: {type(exc).__name__}: {exc}")
        return EXIT_INTERNAL
