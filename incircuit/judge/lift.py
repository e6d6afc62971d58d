"""Lift plans: which single leg to lift so the reading judges the part.

A candidate is one leg: a leg of the part itself (its probes then go on the
lifted leg, i.e. on the part's own pins; pins of the part on one net are one
leg), or one leg of a neighbour on a
path beside the part (the probes stay where they were). Each candidate is
predicted again and ranked by the verdict it reaches (reliable, then
predictable, then masked), then by simplicity (the part's own leg before a
neighbour's), then by how close the reading comes to the isolated one.

Which neighbours: the parts on the paths between the probed nets, in the
graph's order (resistive paths, then capacitive, inductive, mixed, junction
and chip, shortest first), at most ``MAX_NEIGHBOUR_PARTS``. A neighbour's
leg is its leg on a probed net, else the one where the path enters it from
the first probe's side; lifting it breaks that path.

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 1e3), Part("R2", "R", ("A", "C"), 1e3),
...                 Part("R3", "R", ("C", "B"), 1e3)))
>>> [a.describe() for a in lift_candidates(b, "R1", ("A", "B"))]
['lift R1 leg 1 (off net A)', 'lift R1 leg 2 (off net B)', 'lift R2 leg 1 (off net A)', 'lift R3 leg 2 (off net B)']
>>> lift_candidates(b, "R1", ("A", "B"))[1].apply(b, ("A", "B"))[1]
('A', 'R1.PIN2~LIFTED')
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Sequence

from ..graph import between
from ..model import Board
from .thresholds import MAX_NEIGHBOUR_PARTS

__all__ = ["LiftAction", "lift_candidates", "neighbour_parts"]


@dataclass(frozen=True)
class LiftAction:
    """Lift pin ``pin`` (1-based) of ``part`` off ``net``; ``own`` when the
    part is the one being judged."""

    part: str
    pin: int
    net: str
    own: bool

    def describe(self) -> str:
        return f"lift {self.part} leg {self.pin} (off net {self.net})"

    def apply(self, board: Board, probes: Sequence[str]) -> tuple[Board, tuple[str, ...]]:
        """The changed board and the probe nets to use on it.

        Every pin of the part on the same net goes with the leg: one package
        leg carries them all (a MOSFET's bulk pin on its source).
        """
        lifted = board.lifted(self.part, self.pin)
        part = lifted.part(self.part)
        leg = part.pins[self.pin - 1]
        tied = [leg if old == self.net else new for old, new in zip(board.part(self.part).pins, part.pins)]
        if tuple(tied) != part.pins:
            lifted = lifted.with_part(replace(part, pins=tuple(tied)))
        if not self.own:
            return lifted, tuple(probes)
        new_net = lifted.part(self.part).pins[self.pin - 1]
        return lifted, tuple(new_net if p == self.net else p for p in probes)

    def to_dict(self) -> dict:
        return {"part": self.part, "leg": self.pin, "net": self.net, "own": self.own,
                "text": self.describe()}


def neighbour_parts(board: Board, part: str, probes: Sequence[str],
                    limit: int = MAX_NEIGHBOUR_PARTS) -> list[tuple[str, str]]:
    """Parts on the paths between the probed nets (without ``part``), with
    the net on which each one's path enters it, nearest first."""
    nets = list(dict.fromkeys(probes))
    found: dict[str, str] = {}
    own = board.part(part).name
    for i, a in enumerate(nets):
        for b in nets[i + 1:]:
            if a == b:
                continue
            for path in between(board, a, b, without=(own,)).paths:
                for name, net in zip(path.parts, path.nets):
                    if name not in found:
                        on_probe = [n for n in nets if n in board.part(name).pins]
                        found[name] = on_probe[0] if on_probe else net
    # nearest first: parts touching a probed net, then the others
    ordered = sorted(found.items(), key=lambda kv: kv[1] not in nets)
    return ordered[:limit]


def _pin_on(board: Board, name: str, net: str) -> int | None:
    pins = board.part(name).pins
    return pins.index(net) + 1 if net in pins else None


def lift_candidates(board: Board, part: str, probes: Sequence[str],
                    limit: int = MAX_NEIGHBOUR_PARTS, own: bool = True) -> list[LiftAction]:
    """Every single-leg lift worth predicting, own legs first (one per net:
    pins tied together lift as one); ``own`` False: the neighbours' legs
    only; ``limit`` 0: the own legs only."""
    p = board.part(part)
    out = [LiftAction(p.name, i + 1, net, True) for i, net in enumerate(p.pins)
           if net not in p.pins[:i]] if own else []
    if limit <= 0:
        return out
    for name, net in neighbour_parts(board, p.name, probes, limit):
        pin = _pin_on(board, name, net)
        if pin is not None:
            out.append(LiftAction(name, pin, net, False))
    return out
