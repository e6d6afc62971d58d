"""The command line: argument parsing only; the work is done by the layers below.

Each command lives in ``incircuit/commands/<name>.py`` with two functions,
``add_arguments(parser)`` and ``run(args) -> int``. Exit codes: 0 done,
2 bad input (one line on standard error), 1 internal error.
"""

from __future__ import annotations

import argparse
import os
import sys
import warnings
from importlib import import_module

from .errors import InputError

__all__ = ["main", "COMMANDS"]

#: Command name -> one-line help. Order is the order shown in --help.
COMMANDS = {
    "show": "summarise a board, or list the paths around one part",
    "predict": "predict the tester's reading on a part, alone and in circuit",
    "diagnose": "judge a reading you got on a part: desolder it, leave it, or look elsewhere",
    "survey": "survey a whole board: which parts can be checked in place, and what would help",
    "demo": "survey the embedded demo board and write its report into ./incircuit-demo/",
}


def _chosen(argv: list[str]) -> str | None:
    """The command named on the line (the first word that is one), if any."""
    return next((a for a in argv if a in COMMANDS), None)


def build_parser(only: str | None = None) -> argparse.ArgumentParser:
    """The parser; with ``only``, just that command's module is imported
    (the others keep their one-line help), so start-up stays quick."""
    parser = argparse.ArgumentParser(
        prog="incircuit",
        description="Predict and judge what a three-probe component tester reads "
        "on a part that is still soldered to its board.",
    )
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)
    for name, help_text in COMMANDS.items():
        if only is not None and name != only:
            sub.add_parser(name, help=help_text)
            continue
        module = import_module(f".commands.{name}", __package__)
        p = sub.add_parser(name, help=help_text, description=module.__doc__)
        module.add_arguments(p)
        p.set_defaults(_run=module.run)
    return parser


def main(argv: list[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    parser = build_parser(_chosen(argv))
    args = parser.parse_args(argv)
    try:
        with warnings.catch_warnings():
            warnings.filterwarnings("ignore", message="Unsupported Ngspice version")
            return int(args._run(args) or 0)
    except InputError as error:
        print(f"incircuit: {error}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("incircuit: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return 0
    except Exception as error:  # an internal error: one line, traceback on request
        if os.environ.get("INCIRCUIT_DEBUG"):
            raise
        print(f"incircuit: internal error: {type(error).__name__}: {error} "
              "(set INCIRCUIT_DEBUG=1 for the traceback)", file=sys.stderr)
        return 1


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
