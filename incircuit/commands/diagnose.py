"""Judge a reading you got on a part: desolder it, leave it, or look elsewhere.

``incircuit diagnose BOARD PART --reading TEXT`` compares what the tester
showed with what healthy boards read (a Monte Carlo band over every part's
tolerance and the tester's accuracy) and with what each fault of the part
and of its neighbours would read, ranks those explanations and decides:
remove-and-test, leave-in-place, look-elsewhere (naming the neighbour) or
inconclusive, always with the next measurement that would tell the two
leading explanations apart.

Readings are typed as people write them: ``4.7uF``, ``4u7``, ``10k``,
``2R2``, ``1M`` (M is mega, m is milli), ``diode 0.58V``, ``cap 4.7uF``,
``4.1uF esr 2.3``, ``nothing``. ``--readings FILE`` adds rows of a CSV
file with the header ``part,probes,reading`` (probes ``NET1;NET2`` or empty
for the part's pins); all readings are weighed together. See
docs/diagnose.md.

With --json one object: ``decision``, ``reason``, ``hypotheses`` (best
first: ``part``, ``fault``, ``value`` (fitted, SI), ``factor``, ``label``,
``score``, ``silent``, ``predicted``), ``band``, ``bands``, ``next_step``,
``reading``, ``readings``, ``part``, ``probes``, ``groups``, ``notes``,
``cautions``.
"""

from __future__ import annotations

import argparse
import json
import math
import sys

from ..bands import DIAGNOSE_SAMPLES, DEFAULT_SEED
from ..diagnose import Diagnosis, diagnose
from ..errors import EngineError, InputError
from ..model import Reading
from ..readings import load_observations, observation
from ..safety import CAUTIONS, caution_lines
from ..tester.profile import load_profile
from ..units import format_value
from .common import add_board_arguments, load_board_from_args

__all__ = ["add_arguments", "run", "render", "SHOWN_HYPOTHESES"]

#: Hypotheses listed in the text output (--json lists all).
SHOWN_HYPOTHESES = 8


def add_arguments(parser: argparse.ArgumentParser) -> None:
    add_board_arguments(parser)
    parser.add_argument("part", metavar="PART", help="the part you measured (e.g. C12)")
    parser.add_argument("--reading", metavar="TEXT",
                        help="what the tester showed, e.g. '4.1uF', '4k7', 'diode 0.58V', 'nothing'")
    parser.add_argument("--probes", metavar="NET,NET",
                        help="nets the probes were on (default: the part's own pins)")
    parser.add_argument("--readings", metavar="FILE",
                        help="CSV of more readings: header part,probes,reading")
    parser.add_argument("--tester", metavar="FILE", help="tester profile (TOML); default: the shipped one")
    parser.add_argument("--engine", default="analytic", choices=("analytic", "ngspice"),
                        help="simulation engine (default: analytic)")
    parser.add_argument("--samples", type=int, default=DIAGNOSE_SAMPLES, metavar="N",
                        help=f"Monte Carlo samples of the healthy band (default {DIAGNOSE_SAMPLES})")
    parser.add_argument("--seed", type=int, default=DEFAULT_SEED, help="Monte Carlo seed")
    parser.add_argument("--json", action="store_true", help="print one JSON object")


def _reading_text(r: Reading | None) -> str:
    if r is None:
        return "-"
    if r.value is None:
        return r.kind
    text = f"{r.kind} {format_value(r.value, r.unit)}"
    esr = r.extra.get("esr")
    if esr:
        text += f", ESR {format_value(float(esr), 'ohm')}"  # type: ignore[arg-type]
    return text


def render(d: Diagnosis) -> str:
    """The diagnosis as text for a person, cautions last."""
    lines = [f"Board: {d.board}    Part: {d.part}"]
    for obs, band in zip(d.observations, d.bands):
        where = f" [{obs.where}]" if obs.where else ""
        lines.append(f"Reading: {_reading_text(obs.reading)} on {obs.part} "
                     f"({', '.join(obs.probes)}){where}")
        lines.append(f"  healthy boards read: {band.describe()}")
    lines.append("")
    lines.append(f"Decision: {d.decision.upper()}")
    lines.append(f"  {d.reason}")
    lines.append("")
    lines.append("Explanations, best first (share of belief; predicted reading):")
    for s in d.hypotheses[:SHOWN_HYPOTHESES]:
        tag = "  (silent here: reads as healthy)" if s.silent else ""
        lines.append(f"  {s.score * 100:5.1f} %  {s.hypothesis.label():<40} "
                     f"{_reading_text(s.predicted[0] if s.predicted else None)}{tag}")
    if len(d.hypotheses) > SHOWN_HYPOTHESES:
        lines.append(f"  ... {len(d.hypotheses) - SHOWN_HYPOTHESES} more (--json lists all)")
    if d.next_step is not None:
        lines.append("")
        lines.append(f"Next step: {d.next_step.text()}")
    if d.notes:
        lines.append("")
        lines.extend(f"Note: {n}" for n in d.notes)
    lines.append("")
    lines.extend(caution_lines())
    return "\n".join(lines)


def run(args: argparse.Namespace) -> int:
    if not args.reading and not args.readings:
        raise InputError("give --reading TEXT, --readings FILE, or both")
    if args.samples < 20:
        raise InputError(f"--samples {args.samples}: use at least 20")
    board = load_board_from_args(args)  # a demo board name brings its pin-role file
    if not board.has_part(args.part):
        raise InputError(f"no part {args.part!r} on board {board.name}", board.path)
    profile = load_profile(args.tester)
    observations = []
    if args.reading:
        observations.append(observation(board, args.part, args.reading, args.probes))
    elif args.probes:
        raise InputError("--probes belongs to --reading")
    if args.readings:
        observations.extend(load_observations(args.readings, board))
    try:
        result = diagnose(board, args.part, observations, profile, args.engine, args.samples, args.seed)
    except EngineError as error:
        print(f"incircuit: simulation failed for {args.part.upper()}: {error}", file=sys.stderr)
        return 1
    if args.json:
        data = result.to_dict()
        data["cautions"] = list(CAUTIONS)
        print(json.dumps(_finite(data), indent=2, allow_nan=False))
    else:
        print(render(result))
    return 0


def _finite(value: object) -> object:
    """JSON-ready: non-finite numbers become null, numpy scalars plain numbers."""
    if hasattr(value, "item") and not isinstance(value, (dict, list, tuple, str)):
        value = value.item()  # type: ignore[union-attr]
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, dict):
        return {str(k): _finite(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_finite(v) for v in value]
    return value
