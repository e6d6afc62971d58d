"""Predict what the tester reads on a part: alone, in circuit, and the difference.

``incircuit predict BOARD PART`` simulates the tester's identification run
with probe 1 on the part's first pin and probe 2 on its second (a
transistor gets three probes, on C B E or D G S), once on the part alone
and once on the whole board, and prints both readings and how far the
in-circuit one is off (in %, or "kind changes").
``incircuit predict BOARD --between NET_A NET_B`` predicts the reading with
the probes on two nets. BOARD is a netlist file or a demo board name.

With --json one object: ``part`` (null with --between), ``probes`` (net
names, probe 1 first), ``engine``, ``isolated`` and ``in_circuit``, each
``{kind, value, unit, extra}`` (SI units; ``isolated`` is null with
--between), ``uncertain`` (reasons the prediction rests on guessed or
unknown pin roles of unmodelled parts; empty when none, docs/pin-roles.md).
The tester model and its profile keys: docs/tester-model.md.

For a PART the judge adds (unless --no-judge) ``verdict`` (reliable,
predictable or masked), ``sensitivity``, ``reasons``, ``faults``, ``lift``
and ``advice`` (bench instruments); docs/verdicts.md explains them.
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import Sequence

from ..chips import uncertainty_reasons
from ..engines import ENGINES
from ..errors import EngineError, InputError
from ..judge import judge
from ..model import Reading
from ..predict import Prediction, predict, predict_between
from ..safety import caution_lines
from ..tester.profile import Profile, load_profile
from ..units import format_value
from .common import add_board_arguments, load_board_from_args

__all__ = ["add_arguments", "run", "reading_text", "prediction_lines"]

#: Extra values printed after a reading: key -> (label, unit).
EXTRA_TEXT = {
    "esr": ("ESR", "ohm"),
    "self_discharge": ("self-discharge", "%"),
    "vf_low_current": ("Vf at low current", "V"),
    "reverse_volts": ("reverse", "V"),
    "junction_capacitance": ("junction C", "F"),
    "dc_resistance": ("DC resistance", "ohm"),
    "reverse_ohms": ("reverse", "ohm"),
    "vbe": ("Vbe", "V"),
    "gate_capacitance": ("gate C", "F"),
    "body_diode": ("body diode", "V"),
    "gate_junction": ("gate junction", "V"),
}


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("board", metavar="BOARD",
                        help="SPICE netlist of the board, or a demo board name (e.g. power-stage)")
    parser.add_argument("part", metavar="PART", nargs="?", help="the part to predict (e.g. C12)")
    parser.add_argument("--probes", metavar="NET,NET[,NET]",
                        help="nets of probes 1, 2 (and 3) (default: the part's pins in order; "
                             "three for a transistor)")
    parser.add_argument("--between", nargs=2, metavar=("NET_A", "NET_B"),
                        help="predict the reading between two nets instead of on a part")
    parser.add_argument("--tester", metavar="FILE",
                        help="instrument profile (TOML; default: the shipped generic tester)")
    parser.add_argument("--engine", choices=tuple(ENGINES), default="analytic",
                        help="simulation engine (default: analytic)")
    add_board_arguments(parser, board=False)
    parser.add_argument("--no-judge", action="store_true",
                        help="only the readings: no verdict, faults, lift plan or instrument advice")
    parser.add_argument("--json", action="store_true", help="print one JSON object")


def run(args: argparse.Namespace) -> int:
    if bool(args.part) == bool(args.between):
        raise InputError("give a PART or --between NET_A NET_B (one of them)")
    if args.between and args.probes:
        raise InputError("--probes goes with a PART, not with --between")
    profile = load_profile(args.tester)
    board = load_board_from_args(args)  # a demo board name brings its pin-role file
    probes = None
    if args.probes:
        probes = [n.strip() for n in args.probes.split(",")]
        if len(probes) not in (2, 3) or not all(probes):
            raise InputError(f"--probes {args.probes!r}: write two or three nets as NET,NET[,NET]")
    try:
        if args.between:
            found = predict_between(board, *args.between, profile=profile, engine=args.engine)
        else:
            found = predict(board, args.part, probes, profile=profile, engine=args.engine)
    except EngineError as error:
        what = args.part.upper() if args.part else " - ".join(args.between)
        hint = f" ({error.hint})" if error.hint else ""
        print(f"incircuit: {what}: {error.message}{hint}", file=sys.stderr)
        return 1
    uncertain = uncertainty_reasons(board, found.probes)
    judged = None
    if args.part and not args.no_judge:
        judged = judge(board, found.part, found, profile, args.engine)  # type: ignore[arg-type]
    if args.json:
        print(json.dumps({**found.to_dict(), "uncertain": uncertain,
                          **(judged.to_dict() if judged else {})}, indent=2))
    else:
        print("\n".join(prediction_lines(found, profile, board.name, uncertain,
                                          judged.text_lines() if judged else ())))
    return 0


def reading_text(reading: Reading, profile: Profile | None = None) -> str:
    """One line: kind, value with its stated uncertainty, and the extras."""
    text = reading.kind
    if reading.value is not None and reading.unit == "1":
        text += f" hFE {reading.value:.0f}"
    elif reading.value is not None:
        text += f" {format_value(reading.value, reading.unit)}"
        if profile is not None and profile.accuracy(reading) > 0:
            text += f" (+-{format_value(profile.accuracy(reading), reading.unit)})"
    shown = []
    for key, (label, unit) in EXTRA_TEXT.items():
        value = reading.extra.get(key)
        if isinstance(value, (int, float)):
            shown.append(f"{label} {value * 100:.1f} %" if unit == "%" else f"{label} {format_value(value, unit)}")
    if "anode" in reading.extra:
        shown.append(f"anode on probe {reading.extra['anode']}")
    pins = reading.extra.get("pins")
    if isinstance(pins, dict) and pins:
        shown.append("pins " + " ".join(f"{pin}={probe}" for pin, probe in pins.items()))
    if "probes" in reading.extra:
        shown.append("between probes " + ",".join(str(p) for p in reading.extra["probes"]))
    if "reason" in reading.extra:
        shown.append(str(reading.extra["reason"]))
    return text + (f"; {', '.join(shown)}" if shown else "")


def prediction_lines(found: Prediction, profile: Profile | None = None, board: str = "",
                     uncertain: Sequence[str] = (), judged: Sequence[str] = ()) -> list[str]:
    """The text report of one prediction; ``uncertain``: why it rests on guessed pin roles;
    ``judged``: the judge's lines, printed before the safety cautions."""
    probes = ", ".join(f"{i} on {net}" for i, net in enumerate(found.probes, 1))
    head = f"{found.part}" if found.part else "between nets"
    lines = [f"Board: {board}" if board else "", f"{head}: probe {probes} (engine {found.engine})"]
    if found.isolated is not None:
        lines.append(f"  alone:       {reading_text(found.isolated.reading, profile)}")
    lines.append(f"  in circuit:  {reading_text(found.in_circuit.reading, profile)}")
    if found.isolated is not None:
        if found.kind_changes():
            change = "kind changes"
        else:
            diff = found.difference()
            change = "-" if diff is None else f"{diff * 100:+.1f} %"
        lines.append(f"  difference:  {change}")
    lines += [f"  {reason}" for reason in uncertain]
    lines += ["", *judged] if judged else []
    lines += ["", *caution_lines()]
    return [line for i, line in enumerate(lines) if line or i > 0]
