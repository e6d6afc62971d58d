"""Survey a whole board: which parts a repair shop can check in place, and what would help.

``incircuit survey BOARD`` predicts the tester's reading on every part, alone
and in circuit, judges it (reliable, predictable, masked), checks which of
the usual faults would show in circuit (fault coverage), plans lifts and
suggests a design change for every masked part. It prints a summary and
writes three files into DIR (default ``./incircuit-survey/<board>/``,
``<board>-what-if`` with --lift/--set):

* report.html: one self-contained page (works offline): summary, masked
  parts with remedies, the sortable and searchable parts table with a
  detail and a waveform plot per part, safety cautions;
* readings.csv: the expected readings of a good board, one row per part;
* survey.json: everything, one record per part (docs/survey.md).

``--lift PART:PIN`` and ``--set PART=VALUE`` survey a changed board too and
show the coverage of both and the parts whose verdict changed. With --json
survey.json is printed on standard output (and nothing else). BOARD is a
netlist file or a demo board name.
"""

from __future__ import annotations

import argparse
import os
import sys
from contextlib import contextmanager
from pathlib import Path
from typing import Callable, Iterator

from ..demo_boards import resolve_board
from ..engines import ENGINES
from ..errors import InputError
from ..model import Board
from ..report import write_report
from ..report.sheets import survey_json
from ..safety import caution_lines
from ..survey import DEPTHS, Settings, Survey, apply_changes, compare, parse_changes, summary_lines, survey
from ..tester.profile import Profile, load_profile
from .common import add_board_arguments, load_board_from_args

__all__ = ["add_arguments", "run", "add_survey_options", "survey_and_report", "default_out",
           "print_outcome"]


def add_survey_options(parser: argparse.ArgumentParser, jobs_default: int = 1,
                       depth_default: str = "standard") -> None:
    """The options ``survey`` and ``demo`` share."""
    parser.add_argument("--engine", choices=tuple(ENGINES), default="analytic",
                        help="simulation engine (default: analytic)")
    parser.add_argument("--tester", metavar="FILE",
                        help="instrument profile (TOML; default: the shipped generic tester)")
    parser.add_argument("--jobs", metavar="N", type=int, default=jobs_default,
                        help=f"parts surveyed in parallel processes (default: {jobs_default})")
    parser.add_argument("--depth", choices=tuple(DEPTHS), default=depth_default,
                        help="healthy band: quick = each part's tolerance only, standard = "
                        "Monte Carlo over all tolerances (few samples), full = more samples "
                        f"(default: {depth_default}; docs/survey.md)")
    parser.add_argument("--samples", metavar="N", type=int,
                        help="Monte Carlo samples per probed pair of nets, overriding --depth "
                        "(0: tolerance band only)")
    parser.add_argument("--no-plots", action="store_true",
                        help="leave the waveform plots out of the report (faster)")
    parser.add_argument("--no-advice", action="store_true",
                        help="leave out the bench-instrument advice (much faster on large boards)")
    parser.add_argument("--json", action="store_true",
                        help="print survey.json on standard output (and nothing else)")


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("board", metavar="BOARD",
                        help="SPICE netlist of the board, or a demo board name (e.g. power-stage)")
    parser.add_argument("--out", metavar="DIR",
                        help="folder for report.html, readings.csv and survey.json "
                        "(default: ./incircuit-survey/<board>/)")
    parser.add_argument("--lift", metavar="PART:PIN", action="append", default=[],
                        help="what if: survey again with this pin lifted (an opened link); repeatable")
    parser.add_argument("--set", metavar="PART=VALUE", action="append", default=[],
                        help="what if: survey again with this R, C or L value (SPICE number, "
                        "e.g. 47k; m is milli); repeatable")
    add_survey_options(parser)
    add_board_arguments(parser, board=False)


def default_out(path: str, what_if: bool = False) -> Path:
    """``./incircuit-survey/<netlist stem>/`` (``-what-if`` added for a changed board)."""
    stem = Path(path).stem or "board"
    return Path("incircuit-survey") / (stem + ("-what-if" if what_if else ""))


@contextmanager
def _progress(quiet: bool) -> Iterator[Callable[[int, int, str], None] | None]:
    """A rich progress bar on standard error when it is a terminal (else nothing)."""
    if quiet or not sys.stderr.isatty():
        yield None
        return
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn

    # no refresh thread: worker processes are forked, which is unsafe beside a thread
    bar = Progress(TextColumn("{task.description:<28}"), BarColumn(), MofNCompleteColumn(),
                   TimeElapsedColumn(), console=Console(stderr=True), auto_refresh=False,
                   transient=True)
    with bar:
        task = bar.add_task("surveying", total=None)

        def update(done: int, total: int, label: str) -> None:
            bar.update(task, completed=done, total=total, description=f"surveyed {label}"[:28])
            bar.refresh()
        bar.refresh()
        yield update


def survey_and_report(board: Board, profile: Profile, settings: Settings, out: Path,
                      changes=(), quiet: bool = False) -> tuple[Survey, dict[str, Path]]:
    """Survey ``board`` (and, with ``changes``, the changed board against it)
    and write the report of the last one into ``out``."""
    with _progress(quiet) as progress:
        result = survey(board, profile, settings, progress)
        if changes:
            changed = survey(apply_changes(board, changes), profile, settings, progress)
            changed.what_if = compare(result, changed, changes)
            result = changed
    try:
        files = write_report(out, result.to_dict(), result.traces, jobs=settings.jobs)
    except OSError as error:
        raise InputError(f"cannot write the report: {error.strerror or error}", str(out)) from None
    return result, files


def print_outcome(result: Survey, files: dict[str, Path], as_json: bool) -> None:
    """survey.json on stdout with --json, else the summary and where the files are."""
    if as_json:
        sys.stdout.write(survey_json(result.to_dict()))
        return
    lines = summary_lines(result)
    report = files["report.html"]
    lines += ["", f"Report: {report} (open it in a browser)",
              f"Expected readings: {files['readings.csv']}; all data: {files['survey.json']}",
              "", *caution_lines()]
    print("\n".join(lines))


def run(args: argparse.Namespace) -> int:
    profile = load_profile(args.tester)
    path, demo_pins = resolve_board(args.board)
    options = argparse.Namespace(**{**vars(args), "pins": [*demo_pins, *(args.pins or [])]})
    board = load_board_from_args(options, path)
    changes = parse_changes(board, args.lift, args.set)
    settings = Settings(engine=args.engine, depth=args.depth, jobs=args.jobs,
                        plots=not args.no_plots, samples=args.samples, advice=not args.no_advice)
    out = Path(args.out) if args.out else default_out(path, bool(changes))
    if out.exists() and not out.is_dir():
        raise InputError("--out must be a folder, not a file", os.fspath(out))
    result, files = survey_and_report(board, profile, settings, out, changes, quiet=args.json)
    print_outcome(result, files, args.json)
    return 0
