"""The command line: a thin shell over the library.

Each subcommand parses its options, calls the library, prints a report, and
returns an exit code. Errors the user can cause are :class:`PullproofError`
subclasses and print as one line; anything else is an internal error (exit 3),
also printed as one line.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable, Sequence

from . import __version__
from .errors import EXIT_INPUT, EXIT_INTERNAL, PullproofError

__all__ = ["main"]

Handler = Callable[[argparse.Namespace], int]


def _cmd_nets(args: argparse.Namespace) -> int:
    import json

    from .nets import build_circuit
    from .report.nets_out import nets_json, nets_table

    circuit = build_circuit(args.root)
    if args.json:
        print(json.dumps(nets_json(circuit), indent=1, ensure_ascii=False))
    else:
        print(nets_table(circuit), end="")
    return 0


def _cmd_families(args: argparse.Namespace) -> int:
    import json

    from .families.report import families_json, families_table

    if args.json:
        print(json.dumps(families_json(), indent=1, ensure_ascii=False))
    else:
        print(families_table(), end="")
    return 0


def _build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="pullproof",
        description="Check pull-up and pull-down resistors in a schematic against worst-case limits.",
    )
    parser.add_argument("--version", action="version", version=f"pullproof {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)

    p = sub.add_parser("nets", help="list the nets of a schematic (root plus sub-sheets)")
    p.add_argument("root", help="root schematic file (.kicad_sch)")
    p.add_argument("--json", action="store_true", help="print the pullproof.nets/1 JSON document")
    p.set_defaults(handler=_cmd_nets)

    p = sub.add_parser("families", help="list the built-in logic families with their sources")
    p.add_argument("--json", action="store_true", help="print the pullproof.families/1 JSON")
    p.set_defaults(handler=_cmd_families)

    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run pullproof with ``argv`` (default: ``sys.argv[1:]``) and return the exit code."""
    parser = _build_parser()
    args = parser.parse_args(argv)
    handler: Handler = args.handler
    try:
        return handler(args)
    except PullproofError as exc:
        # Positioned errors already read FILE:LINE:COL: …; others get the program name.
        text = str(exc) if exc.location is not None else f"pullproof: {exc}"
        print(text.replace("\n", " "), file=sys.stderr)
        return exc.exit_code
    except BrokenPipeError:
        return 0
    except KeyboardInterrupt:
        print("pullproof: interrupted", file=sys.stderr)
        return 130
    except RecursionError:
        print("pullproof: input nested too deeply to process", file=sys.stderr)
        return EXIT_INPUT
    except Exception as exc:  # noqa: BLE001 - last line of defence: one line, never a traceback
        print(f"pullproof: internal error: {type(exc).__name__}: {exc}", file=sys.stderr)
        return EXIT_INTERNAL
