"""What-if variants: a board with legs lifted or values changed, against the original.

``--lift PART:PIN`` takes pin PIN (1-based) of PART off its net, as an opened
zero-ohm link or a lifted leg would; ``--set PART=VALUE`` gives an R, C or
L a new value (a SPICE number: ``4.7k``, ``10u``, ``1meg``; ``m`` is milli).
:func:`compare` puts the two surveys side by side: both coverages, and the
parts whose verdict changed.

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 1e3), Part("C1", "C", ("A", "B"), 1e-6)))
>>> changes = parse_changes(b, ["C1:2"], ["R1=4.7k"])
>>> [c.describe() for c in changes]
['lift C1 pin 2 (off net B)', 'set R1 to 4.7 kohm (was 1 kohm)']
>>> changed = apply_changes(b, changes)
>>> changed.part("R1").value, changed.part("C1").pins[1]
(4700.0, 'C1.PIN2~LIFTED')
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

from ..errors import InputError
from ..model import Board
from ..netlist.numbers import NumberError, parse_number
from ..units import format_value

__all__ = ["Change", "parse_changes", "apply_changes", "compare"]

_UNITS = {"R": "ohm", "C": "F", "L": "H"}


@dataclass(frozen=True)
class Change:
    """One what-if change: ``kind`` "lift" (``pin``) or "set" (``value``)."""

    kind: str
    part: str
    pin: int | None = None
    value: float | None = None
    net: str | None = None
    old: float | None = None
    unit: str | None = None

    def describe(self) -> str:
        if self.kind == "lift":
            return f"lift {self.part} pin {self.pin} (off net {self.net})"
        return (f"set {self.part} to {format_value(self.value, self.unit)} "
                f"(was {format_value(self.old, self.unit)})")

    def to_dict(self) -> dict:
        return {"change": self.kind, "part": self.part, "pin": self.pin, "value": self.value,
                "net": self.net, "old": self.old, "text": self.describe()}


def _find(board: Board, name: str, option: str):
    try:
        return board.part(name.strip())
    except KeyError:
        raise InputError(f"{option}: no part {name.strip()!r} on board {board.name!r}", board.path) from None


def parse_changes(board: Board, lifts: Sequence[str] = (), sets: Sequence[str] = ()) -> list[Change]:
    """``--lift PART:PIN`` and ``--set PART=VALUE`` options as changes; InputError
    naming the option when one is malformed or names no part of the board."""
    out: list[Change] = []
    for item in lifts:
        name, sep, pin = item.partition(":")
        option = f"--lift {item!r}"
        if not sep or not name.strip() or not pin.strip().isdigit():
            raise InputError(f"{option}: write PART:PIN, e.g. RBLD:2")
        part = _find(board, name, option)
        n = int(pin)
        if not 1 <= n <= len(part.pins):
            raise InputError(f"{option}: {part.name} has pins 1 to {len(part.pins)}", board.path)
        out.append(Change("lift", part.name, pin=n, net=part.pins[n - 1]))
    for item in sets:
        name, sep, text = item.partition("=")
        option = f"--set {item!r}"
        if not sep or not name.strip() or not text.strip():
            raise InputError(f"{option}: write PART=VALUE, e.g. RBLD=47k")
        part = _find(board, name, option)
        if part.kind not in _UNITS:
            raise InputError(f"{option}: only a resistor, capacitor or inductor has a value to set "
                             f"({part.name} is of kind {part.kind})", board.path)
        try:
            value = parse_number(text.strip())
        except (NumberError, ValueError) as error:
            raise InputError(f"{option}: {error}") from None
        if not value > 0:
            raise InputError(f"{option}: the value must be above zero")
        out.append(Change("set", part.name, value=value, old=part.value, unit=_UNITS[part.kind]))
    return out


def apply_changes(board: Board, changes: Sequence[Change]) -> Board:
    """The board with every change made, in order."""
    for change in changes:
        if change.kind == "lift":
            board = board.lifted(change.part, int(change.pin))  # type: ignore[arg-type]
        else:
            board = board.with_part(board.part(change.part).with_value(float(change.value)))  # type: ignore[arg-type]
    return board


def compare(before, after, changes: Sequence[Change]) -> dict:
    """``{"changes", "coverage_before", "coverage_after", "difference", "changed"}``:
    ``changed`` lists ``{"part", "before", "after"}`` for each part whose
    verdict differs (parts present on both boards)."""
    old, new = before.coverage(), after.coverage()
    a, b = before.verdicts(), after.verdicts()
    changed = [{"part": name, "before": a[name], "after": b[name]}
               for name in b if name in a and a[name] != b[name]]
    difference = None
    if old["share"] is not None and new["share"] is not None:
        difference = new["share"] - old["share"]
    return {"changes": [c.to_dict() for c in changes], "coverage_before": old,
            "coverage_after": new, "difference": difference, "changed": changed}
