"""Which nets rest on guessed or unknown pin roles, and what a reading says about it.

A net is *uncertain* when it touches a pin of an unmodelled part whose role
was guessed from a name or is not known at all (such a pin is treated as
open). A reading is marked when one of its probed nets, or a net tied to it
by a near-zero-ohm path (a ``short`` part, a closed switch, or what
:func:`incircuit.graph.is_tie` calls a tie: an inductor, a resistor below
``graph.TIE_OHMS``), is uncertain: the unknown pins act
directly on that node. Further away their effect passes through other parts
and is not flagged.

>>> from incircuit.model import Board, Part
>>> from incircuit.chips.apply import apply_pin_roles
>>> b = apply_pin_roles(Board("t", (Part("U1", "X", ("IN", "GND"), model="ODD"),
...                                 Part("R1", "R", ("IN", "X1"), 1e3))))
>>> sorted(uncertain_nets(b))
['GND', 'IN']
>>> uncertainty_reasons(b, ("X1", "0"))
[]
"""

from __future__ import annotations

from typing import Iterable

from ..graph import is_tie
from ..model import Board, Part
from .roles import UNKNOWN

__all__ = ["uncertain_nets", "tied_nets", "uncertainty_reasons"]


def _is_uncertain(part: Part) -> bool:
    return part.kind == "X" and str(part.params.get("roles_origin", "unknown")) in ("guess", "unknown")


def _pin_phrase(part: Part, pin: int) -> str:
    roles = part.params.get("roles") or ()
    basis = part.params.get("roles_basis") or ()
    role = roles[pin - 1] if pin <= len(roles) else UNKNOWN  # type: ignore[arg-type]
    why = basis[pin - 1] if pin <= len(basis) else ""  # type: ignore[arg-type]
    label = f"{part.name} pin {pin} ({part.model or 'no subcircuit'})"
    if role == UNKNOWN or not why:
        return f"{label}: role unknown, treated as open"
    return f"{label}: {role} guessed from {why}"


def uncertain_nets(board: Board) -> dict[str, str]:
    """Net -> why it is uncertain, for every net touching a guessed or unknown pin."""
    found: dict[str, list[str]] = {}
    for part in board.parts:
        if not _is_uncertain(part):
            continue
        for pin, net in enumerate(part.pins, start=1):
            found.setdefault(net, []).append(_pin_phrase(part, pin))
    out = {}
    for net, phrases in found.items():
        shown = "; ".join(phrases[:3])
        more = f"; and {len(phrases) - 3} more" if len(phrases) > 3 else ""
        out[net] = f"net {net} touches {shown}{more} (no pin-role entry)"
    return out


def _ties(part: Part) -> bool:
    if part.kind in ("R", "L"):
        return is_tie(part)
    if part.kind == "X":
        roles = part.params.get("roles") or ()
        if roles and roles[0] == "short":  # type: ignore[index]
            return True
        return bool(roles) and roles[0] == "switch" and part.params.get("switch_state") == "closed"  # type: ignore[index]
    return False


def tied_nets(board: Board, nets: Iterable[str]) -> set[str]:
    """``nets`` and every net joined to them through near-zero-ohm parts."""
    links: dict[str, set[str]] = {}
    for part in board.parts:
        if len(part.pins) == 2 and _ties(part):
            a, b = part.pins
            links.setdefault(a, set()).add(b)
            links.setdefault(b, set()).add(a)
    seen = set(nets)
    todo = list(seen)
    while todo:
        for other in links.get(todo.pop(), ()):
            if other not in seen:
                seen.add(other)
                todo.append(other)
    return seen


def uncertainty_reasons(board: Board, nets: Iterable[str]) -> list[str]:
    """Reasons a reading on ``nets`` (the probed nets) rests on unknown pin roles.

    Empty when nothing near those nets is uncertain; otherwise one sentence
    per uncertain net, for a prediction's, verdict's or survey row's reasons.
    """
    nets = tuple(nets)
    shaky = uncertain_nets(board)
    if not shaky:
        return []
    out = []
    for net in sorted(tied_nets(board, nets)):
        if net in shaky:
            via = "" if net in nets else " (tied to a probed net)"
            out.append(f"uncertain: {shaky[net]}{via}; add a pin-role file (--pins) to settle it")
    return out
