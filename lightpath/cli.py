"""The ``lightpath`` command line: a thin layer over the Python API.

Exit codes: 0 success, 2 bad input (one-line message, no traceback), 1 internal error.
"""

from __future__ import annotations

import argparse
import importlib
import re
import sys
import warnings
from collections.abc import Sequence
from pathlib import Path

from lightpath import __version__
from lightpath.errors import InputError

__all__ = ["COMMANDS", "build_parser", "main"]

#: Subcommand modules under :mod:`lightpath.commands`, in the order ``--help`` lists them.
COMMANDS = ("sun", "year", "moon", "inspect", "scan", "visit", "report", "frame", "epochs", "demo")

EXIT_OK, EXIT_INTERNAL, EXIT_BAD_INPUT = 0, 1, 2
_PACKAGE_DIR = str(Path(__file__).resolve().parent)


class _Parser(argparse.ArgumentParser):
    """argparse with our exit code for usage errors (2) and a one-line message."""

    def error(self, message: str) -> None:  # type: ignore[override]
        self.exit(EXIT_BAD_INPUT, f"{self.prog}: error: {message}\n")


def _command_modules():
    modules = []
    for name in COMMANDS:
        try:
            modules.append(importlib.import_module(f"lightpath.commands.{name}"))
        except ModuleNotFoundError as exc:  # a command whose module has not landed yet
            if exc.name != f"lightpath.commands.{name}":
                raise
    return modules


def build_parser() -> argparse.ArgumentParser:
    """The argument parser with every available subcommand."""
    parser = _Parser(
        prog="lightpath",
        description="When sunlight enters an opening and reaches a chosen surface inside, at any epoch.",
    )
    parser.add_argument("--version", action="version", version=f"lightpath {__version__}")
    parser.add_argument("--debug", action="store_true", help="show a traceback on internal errors")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for module in _command_modules():
        cmd = sub.add_parser(module.NAME, help=module.HELP, description=module.HELP)
        module.add_arguments(cmd)
        cmd.set_defaults(_run=module.run)
    return parser


_NEGATIVE_VALUE = re.compile(r"^-\d")


def _join_negative_values(argv: Sequence[str]) -> list[str]:
    """``--site -40,170`` → ``--site=-40,170`` so argparse does not take a negative value for an option.

    Southern latitudes, western longitudes and years BC written as negative numbers
    are ordinary values here; no lightpath option is spelled like a negative number.

    >>> _join_negative_values(["scan", "x.toml", "--years", "-3500:-2500:50", "--json"])
    ['scan', 'x.toml', '--years=-3500:-2500:50', '--json']
    """
    out: list[str] = []
    for token in argv:
        if _NEGATIVE_VALUE.match(token) and out and out[-1].startswith("--") and "=" not in out[-1]:
            out[-1] = f"{out[-1]}={token}"
        else:
            out.append(token)
    return out


def _print_notices(command: str, caught: list[warnings.WarningMessage], debug: bool) -> None:
    """lightpath's own warnings (e.g. an unverified Sun before 3000 BC) as one-line notices on stderr.

    Warnings from other libraries are shown only with ``--debug``.
    """
    seen: set[str] = set()
    for w in caught:
        ours = w.filename.startswith(_PACKAGE_DIR) and issubclass(w.category, UserWarning)
        text = " ".join(str(w.message).split())
        if text in seen or not (ours or debug):
            continue
        seen.add(text)
        print(f"lightpath {command}: notice: {text}", file=sys.stderr)


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    parser = build_parser()
    args = parser.parse_args(_join_negative_values(sys.argv[1:] if argv is None else list(argv)))
    if not getattr(args, "_run", None):
        parser.print_help()
        return EXIT_OK
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("default")
            code = int(args._run(args) or EXIT_OK)
        _print_notices(args.command, caught, debug=args.debug)
        return code
    except InputError as exc:
        print(f"lightpath {args.command}: error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("lightpath: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:  # noqa: BLE001 - the last guard of the command line
        if args.debug:
            raise
        print(
            f"lightpath {args.command}: internal error: {type(exc).__name__}: {exc} "
            "(run with --debug for a traceback and please report it)",
            file=sys.stderr,
        )
        return EXIT_INTERNAL
