"""Fault detectability: does each usual fault of the part show in circuit?

For every fault of :func:`incircuit.faults.faults_for` (open, short, value
x0.5 and x2, and for capacitors leakage and high ESR; sizes in
:mod:`incircuit.faults`) the in-circuit reading is predicted on the faulted
board. The fault is *detectable* when that reading lies outside the healthy
band (see :mod:`.band`).

An open part that was the only part on a probed net leaves the probe on a
bare pad. The net is kept on the board by a stub of :data:`OPEN_STUB_OHMS`
to the part's other pin, far above any tester range, so the simulation
still has a net to clip onto.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

from ..errors import EngineError
from ..faults import Fault, apply_fault, faults_for
from ..model import Board, Part, Reading
from .band import HealthyBand
from .runs import Runs

__all__ = ["FaultOutcome", "fault_outcomes", "faulted_board", "OPEN_STUB_OHMS"]

#: An open part keeps its pads as nets through this resistance (ohm), so a
#: probe on a pad with nothing else on it still has a net to touch. A
#: tera-ohm is far beyond every tester and bench range (nothing found).
OPEN_STUB_OHMS = 1e12


@dataclass(frozen=True)
class FaultOutcome:
    """One fault, its predicted in-circuit reading, and whether it shows."""

    fault: Fault
    reading: Reading | None
    detectable: bool
    error: str | None = None

    def to_dict(self) -> dict:
        return {"fault": self.fault.kind, "description": self.fault.describe(),
                "reading": self.reading.to_dict() if self.reading else None,
                "detectable": self.detectable, "error": self.error}


def faulted_board(board: Board, fault: Fault, probes: Sequence[str]) -> Board:
    """The board with ``fault``; probed nets that the fault would empty keep
    an :data:`OPEN_STUB_OHMS` stub to the part's other pin."""
    out = apply_fault(board, fault)
    nets = set(out.nets)
    missing = [n for n in dict.fromkeys(probes) if n not in nets]
    if missing:
        pins = board.part(fault.part).pins
        for i, net in enumerate(missing):
            other = next((q for q in pins if q != net), pins[0])
            out = out.with_part(Part(f"{fault.part}~STUB{i + 1}", "R", (net, other), OPEN_STUB_OHMS))
    return out


def fault_outcomes(runs: Runs, board: Board, part: str, probes: Sequence[str],
                   band: HealthyBand) -> list[FaultOutcome]:
    """The outcome of every usual fault of ``part``, in :func:`faults_for` order."""
    out = []
    for fault in faults_for(board.part(part)):
        try:
            reading = runs.reading(faulted_board(board, fault, probes), probes)
        except (EngineError, ValueError) as error:
            out.append(FaultOutcome(fault, None, False, str(error)))
            continue
        out.append(FaultOutcome(fault, reading, not band.contains(reading)))
    return out
