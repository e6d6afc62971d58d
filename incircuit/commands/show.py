"""Summarise a board, or list what surrounds one part on it.

``incircuit show BOARD`` prints the board's title, its parts counted by kind,
nets, models, unmodelled parts, tied nets and the importer's notes.
``incircuit show BOARD PART`` lists every other path between the part's
pins (per pin pair for a transistor), grouped by what the path is made of,
with the parts in order, the DC resistance of resistive paths, the DC
resistance of the rest of the board and the tied nets. BOARD is a netlist
file or a demo board name (power-stage, sensor-frontend, relay-driver; a
demo board brings its own pin-role file).

With --json the same is printed as one JSON object. Board summary keys:
``board`` (title), ``path``, ``parts`` (count), ``kinds`` (kind letter ->
count), ``nets`` (names), ``models`` (name -> type), ``unmodelled`` (list
of {``part``, ``subckt``, ``origin`` (where its pin roles came from: ``file
<path>``, ``library <name>``, ``guess`` or ``unknown``; also as ``roles``),
``entry`` (``path:line [table]`` or null), ``pins`` (list of {``pin``,
``name``, ``net``, ``role``, ``basis`` (what a guess rests on)}), ``switch``
(state, switches only)}), ``uncertain_nets`` (net -> why: it touches a
guessed or unknown pin), ``tied`` (list of {``nets``, ``parts``}), ``notes``. Part keys:
``board``, ``path``, ``part`` ({``name``, ``kind``, ``pins`` (pin names),
``nets``, ``value``, ``unit``, ``model``, ``tolerance`` ({``minus``,
``plus``, ``origin``} or null), ``location``}), ``tied`` (as above, the
groups touching the part), ``pairs`` (one per pin pair: ``nets``, ``pins``,
``tied``, ``equivalent_resistance`` (ohm, null when the rest does not
connect the pins), ``cut`` (kinds whose list was cut), ``paths`` (kind ->
list of {``kind``, ``parts``, ``nets``, ``dc_resistance``,
``capacitance``, ``conducts``, ``blocks_dc``, ``links``})).
With --between NET_A NET_B (instead of PART) one such pair for any two nets.
"""

from __future__ import annotations

import argparse
import json
import math
from collections import Counter
from typing import Iterable

from ..chips import ALL_ROLES, uncertain_nets, unmodelled_summary
from ..chips.pinmodels import SHORT_OHMS
from ..errors import InputError
from ..graph import (
    MAX_PATHS,
    TIE_OHMS,
    Between,
    Path,
    Surroundings,
    between,
    pin_roles,
    surroundings,
    tie_parts,
    tied_nets,
)
from ..model import Board, Part
from ..units import format_value
from .common import add_board_arguments, load_board_from_args

__all__ = ["add_arguments", "run", "summary", "part_view", "KIND_WORDS", "TEXT_PATHS_PER_KIND"]

#: Part kind letter -> word used in the summary.
KIND_WORDS = {
    "R": "resistor", "C": "capacitor", "L": "inductor", "K": "coupling", "D": "diode",
    "Q": "bipolar transistor", "M": "MOSFET", "J": "JFET", "X": "unmodelled part",
}

#: Paths printed per kind in the text view (--json lists all that were found).
TEXT_PATHS_PER_KIND = 8

_UNITS = {"R": "ohm", "C": "F", "L": "H"}
_KIND_TITLES = {
    "resistive": "resistive (resistors only)",
    "capacitive": "capacitive (capacitors or a MOSFET gate only)",
    "inductive": "inductive (inductors only)",
    "mixed": "mixed (resistors, capacitors and inductors)",
    "junction": "through a junction (diode or transistor)",
    "chip": "through an unmodelled part",
}


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("board", metavar="BOARD",
                        help="SPICE netlist of the board, or a demo board name (e.g. power-stage)")
    parser.add_argument("part", metavar="PART", nargs="?", help="the part to look around (e.g. R12)")
    add_board_arguments(parser, board=False)
    parser.add_argument("--between", nargs=2, metavar=("NET_A", "NET_B"),
                        help="list the paths between two nets instead of around a part")
    parser.add_argument("--json", action="store_true", help="print one JSON object")


def run(args: argparse.Namespace) -> int:
    if args.part and args.between:
        raise InputError("give a PART or --between NET_A NET_B, not both")
    board = load_board_from_args(args)  # a demo board name brings its pin-role file
    if args.between:
        found = between(board, *args.between)
        groups = [g for g in tied_nets(board) if g & set(found.nets)]
        data = {"board": board.name, "path": board.path, "tied": _tied(board, groups),
                "pairs": [found.to_dict()]}
        lines = [f"Board: {board.name}", *_tied_lines(board, groups), *_pair_lines(found)]
    elif args.part:
        s = surroundings(board, args.part)
        part = board.part(s.part)
        data = part_view(board, s)
        lines = _part_lines(board, part, s)
    else:
        data = summary(board)
        lines = _summary_lines(board, data)
    print(json.dumps(data, indent=2) if args.json else "\n".join(lines))
    return 0


# -- data -----------------------------------------------------------------------
def _tied(board: Board, groups: Iterable[frozenset[str]]) -> list[dict]:
    return [{"nets": sorted(g), "parts": list(tie_parts(board, g))} for g in groups]


def summary(board: Board) -> dict:
    """The board summary as plain data (the --json object)."""
    kinds = Counter(p.kind for p in board.parts)
    order = {k: i for i, k in enumerate(KIND_WORDS)}
    return {
        "board": board.name,
        "path": board.path,
        "parts": len(board.parts),
        "kinds": {k: kinds[k] for k in sorted(kinds, key=lambda k: (order.get(k, 99), k))},
        "nets": list(board.nets),
        "models": {name: m.type for name, m in sorted(board.models.items())},
        "unmodelled": [{"roles": u["origin"], **u} for u in unmodelled_summary(board)],
        "uncertain_nets": uncertain_nets(board),
        "tied": _tied(board, tied_nets(board)),
        "notes": list(board.notes),
    }


def part_view(board: Board, s: Surroundings) -> dict:
    """A part's surroundings as plain data (the --json object)."""
    part = board.part(s.part)
    tol = part.tolerance
    return {
        "board": board.name,
        "path": board.path,
        "part": {
            "name": part.name,
            "kind": part.kind,
            "pins": list(pin_roles(part)),
            "nets": list(part.pins),
            "value": part.value,
            "unit": _UNITS.get(part.kind),
            "model": part.model,
            "tolerance": None if tol is None else {"minus": tol.minus, "plus": tol.plus, "origin": tol.origin},
            "location": None if part.location is None else str(part.location),
        },
        "tied": _tied(board, s.tied),
        "pairs": [pair.to_dict() for pair in s.pairs],
    }


# -- text -------------------------------------------------------------------------
def _summary_lines(board: Board, d: dict) -> list[str]:
    kinds = ", ".join(f"{n} {KIND_WORDS.get(k, k)}{'s' if n != 1 else ''}" for k, n in d["kinds"].items())
    models = ", ".join(f"{n} ({t})" for n, t in d["models"].items()) or "none"
    lines = [f"Board:  {d['board']}", f"File:   {d['path']}", f"Parts:  {d['parts']} ({kinds})",
             f"Nets:   {len(d['nets'])}: {', '.join(d['nets'])}", f"Models: {models}"]
    if d["unmodelled"]:
        lines.append("Unmodelled parts (pin roles and where they come from; see --pins):")
        for u in d["unmodelled"]:
            lines.extend(_unmodelled_lines(u))
    if d["uncertain_nets"]:
        lines.append(f"Uncertain nets (touch a guessed or unknown pin; readings on them are marked): "
                     f"{len(d['uncertain_nets'])}: {', '.join(sorted(d['uncertain_nets']))}")
    lines.extend(_tied_lines(board, tied_nets(board)))
    if d["notes"]:
        lines.append("Notes from the import:")
        lines.extend(f"  {n}" for n in d["notes"])
    return lines


def _tie_value(p: Part) -> str:
    if p.kind == "X":  # a short or a closed switch by its pin role
        role = (p.params.get("roles") or ("",))[0]  # type: ignore[index]
        return f"{role}, {format_value(p.params.get('short_ohms') or SHORT_OHMS, 'ohm')}"  # type: ignore[arg-type]
    return format_value(p.value, _UNITS.get(p.kind))


def _unmodelled_lines(u: dict) -> list[str]:
    """One part's roles, grouped by role: ``supply: 4 VCC (+3V3), 6 (+3V3)``."""
    origin = u["origin"]
    if u.get("entry"):  # "file <path>" -> "file <path>:<line> [table]"
        origin = f"file {u['entry']}" if origin.startswith("file ") else f"{origin}: {u['entry']}"
    state = f", switch {u['switch']}" if u.get("switch") else ""
    lines = [f"  {u['part']} ({u['subckt']}): {origin}{state}"]
    groups: dict[str, list[str]] = {}
    for pin in u["pins"]:
        label = f"{pin['pin']}{' ' + pin['name'] if pin['name'] else ''} ({pin['net']})"
        role = pin["role"] if pin["role"] != "unknown" else "unknown (open)"
        groups.setdefault(role, []).append(label)
    order = {r: i for i, r in enumerate((*ALL_ROLES, "unknown (open)"))}
    lines.extend(f"    {role}: {', '.join(groups[role])}" for role in sorted(groups, key=order.get))
    return lines


def _tied_lines(board: Board, groups: Iterable[frozenset[str]]) -> list[str]:
    groups = list(groups)
    if not groups:
        return ["Tied nets: none"]
    lines = [f"Tied nets (joined by inductors or parts below {format_value(TIE_OHMS, 'ohm')}; each group acts as one net):"]
    for g in groups:
        parts = [board.part(n) for n in tie_parts(board, g)]
        by = ", ".join(f"{p.name} {_tie_value(p)}" for p in parts)
        lines.append(f"  {', '.join(sorted(g))}  (by {by})")
    return lines


def _part_lines(board: Board, part: Part, s: Surroundings) -> list[str]:
    detail = [format_value(part.value, _UNITS[part.kind])] if part.kind in _UNITS and part.value is not None else []
    if part.kind == "K":
        coupled = " and ".join(str(n) for n in part.params.get("inductors") or ())  # type: ignore[union-attr]
        detail.append(f"k={part.value:g} between {coupled}" if part.value is not None else coupled)
    if part.model:
        detail.append(f"model {part.model}")
    tol = part.tolerance
    if tol is not None:
        band = (f"{tol.minus * 100:g} %" if tol.minus == tol.plus
                else f"-{tol.minus * 100:g} %/+{tol.plus * 100:g} %")
        detail.append(f"tol {band}" + (" (default)" if tol.origin == "default" else ""))
    pins = ", ".join(f"{role}={net}" for role, net in zip(pin_roles(part), part.pins)) or "none"
    where = f"   [{part.location}]" if part.location else ""
    lines = [f"{part.name}: {KIND_WORDS.get(part.kind, part.kind)}"
             + (f" ({', '.join(detail)})" if detail else ""),
             f"  pins: {pins}{where}", f"  board: {board.name}"]
    lines.extend(_tied_lines(board, s.tied))
    if not s.pairs:
        lines.append("  no pair of pins on different nets: nothing to look between")
    for pair in s.pairs:
        lines.extend(_pair_lines(pair, with_pins=len(s.pairs) > 1))
    return lines


def _pair_lines(pair: Between, with_pins: bool = False) -> list[str]:
    a, b = pair.nets
    head = f"pins {pair.pins[0]}-{pair.pins[1]}: " if with_pins else ""
    lines = ["", f"{head}other paths between {a} and {b}" + ("  (the two nets are tied)" if pair.tied else "")]
    eq = pair.equivalent_resistance
    eq_text = format_value(eq, "ohm") if math.isfinite(eq) else "none (no resistive connection)"
    lines.append(f"  DC resistance of the rest of the board (resistors and inductors): {eq_text}")
    groups = pair.by_kind()
    if not groups:
        lines.append("  no other path")
    for kind, paths in groups.items():
        cut = kind in pair.cut
        lines.append(f"  {_KIND_TITLES[kind]}: {len(paths)}{'+' if cut else ''}")
        lines.extend(f"    {_path_text(p)}" for p in paths[:TEXT_PATHS_PER_KIND])
        hidden = len(paths) - TEXT_PATHS_PER_KIND
        if hidden > 0 or cut:
            count = f"{hidden} more" if hidden > 0 else "more"
            note = f"; the search stops at {MAX_PATHS} per kind" if cut else ""
            lines.append(f"    ... {count} (--json lists all found{note})")
    return lines


def _path_text(path: Path) -> str:
    extra = ""
    if path.kind in ("junction", "chip"):
        first, last = path.nets[0], path.nets[-1]
        words = {"forward": f"conducts {first} -> {last}", "reverse": f"conducts {last} -> {first}",
                 "neither": "junctions face each other", "both": ""}[path.conducts]
        if words and path.conducts != "neither" and path.blocks_dc:
            words += " while a capacitor charges"
        extra = f"; {words}" if words else ""
    return f"{path.describe()}   [{' - '.join(path.nets)}{extra}]"
