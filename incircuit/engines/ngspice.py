"""The ngspice engine: each step is one ngspice transient run.

The board is written once per session as a sanitised deck
(:mod:`.spice_deck`); each :meth:`NgspiceSession.run` writes the step's
sources and the state carried from the previous step (capacitor and node
voltages, inductor currents, junction voltages) as initial conditions and
runs a transient with ``uic`` through the shared library (:mod:`.spice_lib`).

* Sample times are breakpoints of the run, so ngspice computes a point at
  each of them exactly.
* A watch is found in ngspice's output, then the interval that holds the
  crossing is run again from its start with a fine maximum step; the
  crossing time is interpolated linearly there, and the state at that time
  becomes the next step's initial state.

Every failure (ngspice missing, a deck it rejects, a run that stops) is an
:class:`~incircuit.errors.EngineError` with a hint, never a crash.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from ..errors import EngineError
from ..model import Board
from . import spice_deck, spice_lib
from .base import Drive, StepResult, Watch

__all__ = ["ENGINE", "NgspiceEngine", "NgspiceSession", "available", "STEPS_PER_RUN", "REFINE_STEPS"]

#: The longest internal step is the step's duration divided by this.
STEPS_PER_RUN = 200
#: Points across the interval that holds a watch crossing, on the second run.
REFINE_STEPS = 200
#: Solver options of every run: 100x tighter than SPICE's default accuracy
#: (reltol=1e-3, trtol=7); the time-domain error of an RC step is below
#: 3e-4 V on 5 V with them (measured).
OPTIONS = "reltol=1e-5 trtol=0.1"
#: Options of the second attempt when a run fails: SPICE's defaults, with
#: Gear integration.
FALLBACK_OPTIONS = "reltol=1e-3 trtol=7 method=gear"

_TRY_ANALYTIC = "try --engine analytic"


def available() -> str | None:
    """None when ngspice can run here, else the reason why not."""
    return spice_lib.unavailable_reason()


@dataclass
class _Trace:
    """One ngspice run: times and every node voltage / inductor current."""

    t: np.ndarray
    volts: dict[str, np.ndarray]
    currents: dict[str, np.ndarray]

    def state_at(self, i: int) -> tuple[dict[str, float], dict[str, float]]:
        return ({k: float(v[i]) for k, v in self.volts.items()},
                {k: float(v[i]) for k, v in self.currents.items()})

    def state_between(self, i: int, frac: float) -> tuple[dict[str, float], dict[str, float]]:
        def mix(v: np.ndarray) -> float:
            return float(v[i] + frac * (v[i + 1] - v[i]))

        return ({k: mix(v) for k, v in self.volts.items()}, {k: mix(v) for k, v in self.currents.items()})


def _first_crossing(s: np.ndarray, level: float, rising: bool) -> int | None:
    """Index i >= 1 of the first point past ``level`` after one before it; 0 if s[0] is past."""
    past = s >= level if rising else s <= level
    if past[0]:
        return 0
    hits = np.flatnonzero(past)
    return int(hits[0]) if len(hits) else None


def _fraction(a: float, b: float, level: float) -> float:
    return 0.0 if b == a else min(1.0, max(0.0, (level - a) / (b - a)))


class NgspiceSession:
    """A board with probes attached, simulated by ngspice one step at a time."""

    def __init__(self, deck: spice_deck.Deck, probe_nets: Sequence[str]):
        self.probe_nets = tuple(probe_nets)
        self._deck = deck
        self._volts = {node: 0.0 for node in deck.nodes}
        self._currents = {name: 0.0 for name in deck.inductors}

    # -- ngspice ----------------------------------------------------------
    def _simulate(self, volts, currents, drive: Drive, duration: float, tmax: float,
                  breakpoints: Sequence[float] = ()) -> _Trace:
        deck = self._deck
        names = [*deck.nodes, *(f"{ident}#branch" for ident in deck.inductors)]
        try:
            data = spice_lib.run(deck.text(volts, currents, drive, duration, tmax, breakpoints, OPTIONS),
                                 names, duration)
        except spice_lib.SimulationFailed as failure:
            try:  # a second attempt with SPICE's default tolerances
                data = spice_lib.run(deck.text(volts, currents, drive, duration, tmax, breakpoints,
                                               FALLBACK_OPTIONS), names, duration)
            except spice_lib.SimulationFailed:
                raise self._engine_error(failure) from None
        t = np.concatenate(([0.0], data["time"]))
        return _Trace(
            t,
            {n: np.concatenate(([volts.get(n, 0.0)], data[n])) for n in deck.nodes},
            {i: np.concatenate(([currents.get(i, 0.0)], data[f"{i}#branch"])) for i in deck.inductors},
        )

    def _engine_error(self, failure: spice_lib.SimulationFailed) -> EngineError:
        """ngspice's complaint in board names, with what to check."""
        deck = self._deck
        text = " ".join(failure.lines)
        suspects: list[str] = []
        for ident in re.findall(r"instance\s+([a-z]+\d+)", text) + re.findall(r"\b(mdl\d+)\b", text):
            if ident in deck.blame and deck.blame[ident] not in suspects:
                suspects.append(deck.blame[ident])
        for node in re.findall(r"node\s+\"?(n\d+)", text):
            nets = deck.nets_of(node)
            if nets:
                suspects.append("the parts on net " + "/".join(nets))
        what = "timestep too small" if "timestep too small" in text.lower() else str(failure)
        hint = (f"check {', '.join(suspects)}; " if suspects else "") + _TRY_ANALYTIC
        return EngineError(f"ngspice: {what}", hint)

    # -- the Session interface -------------------------------------------
    def run(
        self,
        drive: Drive,
        duration: float,
        *,
        watch: Watch | None = None,
        sample_times: Sequence[float] = (),
    ) -> StepResult:
        """Simulate ``duration`` seconds under ``drive`` (see :class:`~.base.Session`)."""
        deck = self._deck
        if len(drive) != len(self.probe_nets):
            raise ValueError(f"drive has {len(drive)} entries for {len(self.probe_nets)} probes")
        if not math.isfinite(duration) or duration < 0:
            raise ValueError(f"step duration must be finite and >= 0, got {duration!r}")
        times = np.asarray(list(sample_times), dtype=float)
        if duration == 0:
            trace = _Trace(np.zeros(1), {k: np.array([v]) for k, v in self._volts.items()},
                           {k: np.array([v]) for k, v in self._currents.items()})
        else:
            trace = self._simulate(self._volts, self._currents, drive, duration,
                                   duration / STEPS_PER_RUN, times)
        end, crossed = duration, False
        volts, currents = trace.state_at(len(trace.t) - 1)
        if watch is not None:
            found = self._watch(trace, drive, watch)
            if found is not None:
                end, volts, currents = found
                crossed = True
        self._volts, self._currents = volts, currents
        probe_v = tuple(float(volts[n]) for n in deck.probe_nodes)
        samples = np.full((len(times), len(self.probe_nets)), np.nan)
        inside = times <= end * (1 + 1e-12)
        for k, node in enumerate(deck.probe_nodes):
            samples[inside, k] = np.interp(times[inside], trace.t, trace.volts[node])
        return StepResult(end, crossed, probe_v, samples, deck.net_volts(volts))

    def _signal(self, trace: _Trace, watch: Watch) -> np.ndarray:
        nodes = self._deck.probe_nodes
        s = trace.volts[nodes[watch.probe]]
        return s - trace.volts[nodes[watch.minus]] if watch.minus is not None else s

    def _watch(self, trace: _Trace, drive: Drive, watch: Watch):
        """(time, volts, currents) at the first crossing, or None."""
        s = self._signal(trace, watch)
        i = _first_crossing(s, watch.level, watch.rising)
        if i is None:
            return None
        if i == 0:
            return (0.0, *trace.state_at(0))
        t0, t1 = float(trace.t[i - 1]), float(trace.t[i])
        start = trace.state_at(i - 1)
        fine = None
        if t1 - t0 > 1e-15 * max(1.0, t1):
            try:
                fine = self._simulate(*start, drive, t1 - t0, (t1 - t0) / REFINE_STEPS)
            except EngineError:
                fine = None  # the coarse interpolation below still holds
        if fine is not None:
            fs = self._signal(fine, watch)
            j = _first_crossing(fs, watch.level, watch.rising)
            if j is not None and j > 0:
                frac = _fraction(fs[j - 1], fs[j], watch.level)
                tc = fine.t[j - 1] + frac * (fine.t[j] - fine.t[j - 1])
                return (t0 + float(tc), *fine.state_between(j - 1, frac))
        frac = _fraction(s[i - 1], s[i], watch.level)
        return (t0 + frac * (t1 - t0), *trace.state_between(i - 1, frac))


class NgspiceEngine:
    """Engine "ngspice": the board simulated by ngspice (see module docs)."""

    name = "ngspice"

    def open(self, board: Board, probe_nets: Sequence[str], stray: float) -> NgspiceSession:
        """A session with every capacitor and inductor discharged.

        Raises EngineError when ngspice is missing or a part cannot be written.
        """
        deck = spice_deck.build(board, probe_nets, stray)
        reason = available()
        if reason is not None:
            raise EngineError(f"ngspice engine unavailable: {reason}", spice_lib.INSTALL_HINT)
        return NgspiceSession(deck, probe_nets)


#: The engine that ``get_engine("ngspice")`` returns.
ENGINE = NgspiceEngine()
