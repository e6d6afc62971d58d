"""Survey the embedded demo board and write its report: the tool's main job in one command.

``incircuit demo`` surveys the demo board (a power stage invented for the
purpose: fused bridge, reservoir capacitors and bleeder, regulator, zener
rail, LED) into ``./incircuit-demo/`` (or DIR) and prints the fault
coverage, the parts per verdict, the masked parts with the design change
that would let a repair shop check them in place, and where the report is.
Parts run in parallel processes, one per CPU core unless --jobs says
otherwise, and the healthy bands are the quick ones (each part's own
tolerance) so the demo takes seconds; ``--depth standard`` adds the Monte
Carlo bands of ``incircuit survey``. The other options are those of
``incircuit survey``; --board picks another demo board.
"""

from __future__ import annotations

import argparse
import os
from pathlib import Path

from ..demo_boards import DEFAULT_DEMO, DEMO_BOARDS, resolve_board
from ..survey import Settings
from ..tester.profile import load_profile
from .common import load_board_from_args
from .survey import add_survey_options, print_outcome, survey_and_report

__all__ = ["add_arguments", "run", "DEFAULT_DIR"]

#: Where the demo report goes when no DIR is given.
DEFAULT_DIR = "incircuit-demo"


def _cores() -> int:
    return len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count() or 1


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("dir", metavar="DIR", nargs="?", default=DEFAULT_DIR,
                        help=f"folder for the report (default: ./{DEFAULT_DIR}/)")
    parser.add_argument("--board", choices=tuple(DEMO_BOARDS), default=DEFAULT_DEMO,
                        help=f"which demo board (default: {DEFAULT_DEMO})")
    add_survey_options(parser, jobs_default=_cores(), depth_default="quick")


def run(args: argparse.Namespace) -> int:
    profile = load_profile(args.tester)
    path, pins = resolve_board(args.board)
    board = load_board_from_args(argparse.Namespace(pins=list(pins), switch=[], keep_sources=False), path)
    settings = Settings(engine=args.engine, depth=args.depth, jobs=args.jobs,
                        plots=not args.no_plots, samples=args.samples, advice=not args.no_advice)
    result, files = survey_and_report(board, profile, settings, Path(args.dir), quiet=args.json)
    print_outcome(result, files, args.json)
    return 0
