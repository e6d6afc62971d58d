"""Fault hypotheses and how each one changes a board.

A :class:`Fault` names a part and what is wrong with it; :func:`apply_fault`
returns the changed Board. The judge asks whether each fault shows in the
in-circuit reading; diagnosis scores how well each one explains a reading.

The fault sizes are one documented place:

* ``open``   the part is removed (a broken lead, a cracked body);
* ``short``  the part becomes ``SHORT_OHMS`` (common practice: a shorted
  part reads a fraction of an ohm on a meter);
* ``low``    value x ``LOW_FACTOR``; ``high`` value x ``HIGH_FACTOR``;
* ``drift``  value x ``factor`` (fitted by diagnosis);
* ``leakage`` a resistance ``LEAK_OHMS`` (or ``ohms``) in parallel;
* ``esr``    a capacitor's series resistance raised to ``HIGH_ESR_OHMS``
  (common practice: an aged electrolytic reads several ohms).

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("C1", "C", ("A", "B"), 1e-6),))
>>> apply_fault(b, Fault("C1", "low")).part("C1").value
5e-07
>>> [p.name for p in apply_fault(b, Fault("C1", "leakage")).parts]
['C1', 'C1~LEAK']
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from .model import Board, Part

__all__ = [
    "Fault",
    "apply_fault",
    "faults_for",
    "FAULT_KINDS",
    "SHORT_OHMS",
    "LOW_FACTOR",
    "HIGH_FACTOR",
    "LEAK_OHMS",
    "HIGH_ESR_OHMS",
]

SHORT_OHMS = 0.05
LOW_FACTOR = 0.5
HIGH_FACTOR = 2.0
LEAK_OHMS = 1e3
HIGH_ESR_OHMS = 5.0

FAULT_KINDS = ("open", "short", "low", "high", "drift", "leakage", "esr")


@dataclass(frozen=True)
class Fault:
    """``kind`` of fault on ``part``; ``amount`` is the factor of ``drift``,
    the resistance of ``leakage`` or the ESR of ``esr`` when given."""

    part: str
    kind: str
    amount: float | None = None

    def __post_init__(self) -> None:
        if self.kind not in FAULT_KINDS:
            raise ValueError(f"unknown fault {self.kind!r}")
        object.__setattr__(self, "part", self.part.upper())

    def describe(self) -> str:
        if self.kind == "drift" and self.amount is not None:
            return f"{self.part} at {self.amount * 100:.0f} % of nominal"
        words = {
            "open": "open",
            "short": "shorted",
            "low": f"at {LOW_FACTOR:g}x its value",
            "high": f"at {HIGH_FACTOR:g}x its value",
            "leakage": "leaky",
            "esr": "with high ESR",
            "drift": "drifted",
        }
        return f"{self.part} {words[self.kind]}"


def faults_for(part: Part) -> tuple[Fault, ...]:
    """The usual fault hypotheses of a part, by kind."""
    kinds: tuple[str, ...]
    if part.kind == "C":
        kinds = ("open", "short", "low", "high", "leakage", "esr")
    elif part.kind in ("R", "L"):
        kinds = ("open", "short", "low", "high")
    elif part.kind == "D":
        kinds = ("open", "short", "leakage")
    else:
        kinds = ("open", "short")
    return tuple(Fault(part.name, k) for k in kinds)


def apply_fault(board: Board, fault: Fault) -> Board:
    """The board with ``fault`` applied."""
    part = board.part(fault.part)
    if fault.kind == "open":
        return board.without_part(part.name)
    if fault.kind == "short":
        if len(part.pins) == 2:
            short = Part(part.name, "R", part.pins, SHORT_OHMS, location=part.location)
            return board.with_part(short)
        # three-terminal part: the first two pins shorted, the part kept
        extra = Part(f"{part.name}~SHORT", "R", part.pins[:2], SHORT_OHMS)
        return board.with_part(extra)
    if fault.kind in ("low", "high", "drift"):
        if part.value is None:
            raise ValueError(f"{part.name} has no value to drift")
        factor = {"low": LOW_FACTOR, "high": HIGH_FACTOR}.get(fault.kind, fault.amount)
        if factor is None:
            raise ValueError("drift needs a factor")
        return board.with_part(part.with_value(part.value * factor))
    if fault.kind == "leakage":
        ohms = fault.amount if fault.amount is not None else LEAK_OHMS
        leak = Part(f"{part.name}~LEAK", "R", part.pins[:2], ohms)
        return board.with_part(leak)
    if fault.kind == "esr":
        if part.kind != "C":
            raise ValueError(f"{part.name} is not a capacitor")
        ohms = fault.amount if fault.amount is not None else HIGH_ESR_OHMS
        params = dict(part.params, esr=ohms)
        return board.with_part(replace(part, params=params))
    raise ValueError(fault.kind)  # unreachable: kinds are checked on creation
