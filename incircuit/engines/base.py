"""The one interface every simulation engine fulfils.

An engine simulates the board with the tester's probes clipped on. The
tester model (``incircuit.tester``) drives the probes step by step; the
engine only knows Thevenin sources on the probed nets:

* ``Engine.open(board, probe_nets, stray)`` gives a :class:`Session` whose
  every capacitor voltage and inductor current starts at zero (an unpowered,
  discharged board).
* ``Session.run(drive, duration, ...)`` simulates one step and carries the
  state (node voltages, inductor currents, junction states) on to the next.

The tester's ground is the reference of every voltage. Board nets that are
not probed float; they reach the tester only through the board's parts.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping, Protocol, Sequence

import numpy as np

from ..model import Board

__all__ = ["Source", "Drive", "Watch", "StepResult", "Session", "Engine"]


@dataclass(frozen=True)
class Source:
    """A probe driven through ``resistance`` (ohm) to ``volts`` (V)."""

    resistance: float
    volts: float


#: One entry per probe, in probe order; ``None`` leaves the probe floating
#: (only its stray capacitance to the tester's ground stays).
Drive = tuple[Source | None, ...]


@dataclass(frozen=True)
class Watch:
    """End a step early when ``V[probe] - V[minus]`` crosses ``level``.

    ``minus`` None means the tester's ground. ``rising`` selects the
    direction of the crossing.
    """

    probe: int
    level: float
    minus: int | None = None
    rising: bool = True


@dataclass(frozen=True)
class StepResult:
    """What one step produced.

    duration
        Time simulated (s): the crossing time when a watch fired, else the
        requested duration.
    crossed
        Whether the watch fired.
    volts
        Probe voltages at the end of the step, in probe order.
    samples
        Probe voltages at the requested sample times, shape
        ``(len(sample_times), n_probes)``; rows after the end are NaN.
    nets
        Every simulated net's voltage at the end of the step (for the
        judge: which junctions conduct, how the probe current splits).
    """

    duration: float
    crossed: bool
    volts: tuple[float, ...]
    samples: np.ndarray
    nets: Mapping[str, float] = field(default_factory=dict)


class Session(Protocol):
    """A board with probes attached, simulated one step at a time."""

    probe_nets: tuple[str, ...]

    def run(
        self,
        drive: Drive,
        duration: float,
        *,
        watch: Watch | None = None,
        sample_times: Sequence[float] = (),
    ) -> StepResult:
        """Simulate ``duration`` seconds under ``drive``."""
        ...


class Engine(Protocol):
    """A way of simulating a Board: "analytic" or "ngspice"."""

    name: str

    def open(self, board: Board, probe_nets: Sequence[str], stray: float) -> Session:
        """Attach probes to ``probe_nets``; each probe has ``stray`` farads to ground."""
        ...
