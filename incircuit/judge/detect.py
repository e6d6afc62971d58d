"""Fault detectability: does each usual fault of the part show in circuit?

For every fault of :func:`incircuit.faults.faults_for` (open, short, value
x0.5 and x2, and for capacitors leakage and high ESR; sizes in
:mod:`incircuit.faults`) the in-circuit reading is predicted on the faulted
board. The fault is *detectable* when that reading lies outside the healthy
band (see :mod:`.band`).

An open part that was the only part on a probed net leaves the probe on a
bare pad; :func:`.runs.reachable` keeps such a net with a tera-ohm stub.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

from ..faults import Fault, apply_fault, faults_for
from ..model import Board, Reading
from .band import HealthyBand
from .runs import RUN_FAILURES, Runs

__all__ = ["FaultOutcome", "fault_outcomes"]


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


def fault_outcomes(runs: Runs, board: Board, part: str, probes: Sequence[str],
                   band: HealthyBand) -> list[FaultOutcome]:
    """The outcome of every usual fault of ``part``, in :func:`faults_for` order."""
    out = []
    for fault in faults_for(board.part(part)):
        try:
            reading = runs.reading(apply_fault(board, fault), probes)
        except RUN_FAILURES as error:
            out.append(FaultOutcome(fault, None, False, str(error)))
            continue
        out.append(FaultOutcome(fault, reading, not band.contains(reading)))
    return out
