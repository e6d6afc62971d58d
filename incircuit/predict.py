"""Predict what the tester reads on a part: alone, and soldered to its board.

:func:`identify` runs the tester's identification (see
:mod:`incircuit.tester.identify`) on the nets a board's probes touch;
:func:`predict` does it twice, on the part alone (``board.only(part)``) and
on the whole board, so the two readings can be compared.

>>> from incircuit.model import Board, Part
>>> board = Board("demo", (Part("R1", "R", ("A", "B"), 10e3), Part("R2", "R", ("A", "B"), 10e3)))
>>> pred = predict(board, "R1")
>>> round(pred.isolated.reading.value, -2), round(pred.in_circuit.reading.value, -2)
(10000.0, 5000.0)
>>> round(pred.difference(), 2)
-0.5
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from .engines import get_engine
from .errors import EngineError, InputError
from .model import Board, Reading
from .tester.bench import StepRecord
from .tester.identify import run_identification
from .tester.profile import Profile, load_profile
from .tester.three_terminal import analytic_limits, channel_probed, run_three_terminal

__all__ = [
    "StepRecord",
    "Run",
    "Prediction",
    "identify",
    "predict",
    "predict_between",
    "default_probes",
    "reading_dict",
    "THREE_TERMINAL",
]

#: Part kinds probed with three probes by default.
THREE_TERMINAL = ("Q", "M", "J")


@dataclass(frozen=True)
class Run:
    """One identification run on one board: the reading and every step."""

    reading: Reading
    steps: tuple[StepRecord, ...]

    @property
    def duration(self) -> float:
        """Tester time of the whole run (s)."""
        return self.steps[-1].t_end if self.steps else 0.0

    def trace(self) -> tuple[np.ndarray, np.ndarray]:
        """Every step's samples on one time axis: ``t`` (s), volts ``[n, n_probes]``."""
        times: list[np.ndarray] = []
        volts: list[np.ndarray] = []
        for step in self.steps:
            rel = np.asarray(step.sample_times, dtype=float)
            rows = np.asarray(step.result.samples, dtype=float).reshape(len(rel), -1) if len(rel) else None
            if rows is not None:
                keep = (rel <= step.result.duration * (1 + 1e-9)) & np.all(np.isfinite(rows), axis=1)
                times.append(step.t_start + rel[keep])
                volts.append(rows[keep])
            times.append(np.array([step.t_end]))
            volts.append(np.asarray(step.result.volts, dtype=float).reshape(1, -1))
        if not times:
            return np.zeros(0), np.zeros((0, 0))
        t = np.concatenate(times)
        v = np.concatenate(volts)
        order = np.argsort(t, kind="stable")
        return t[order], v[order]


def _jsonable(value: object) -> object:
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, (np.floating, np.integer)):
        return _jsonable(value.item())
    if isinstance(value, dict):
        return {str(k): _jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_jsonable(v) for v in value]
    return value


def reading_dict(reading: Reading | None) -> dict | None:
    """``{"kind", "value", "unit", "extra"}`` with non-finite numbers as None."""
    if reading is None:
        return None
    return _jsonable(reading.to_dict())  # type: ignore[return-value]


@dataclass(frozen=True)
class Prediction:
    """The tester's reading on ``part`` (None: two nets) alone and in circuit."""

    part: str | None
    probes: tuple[str, ...]
    engine: str
    isolated: Run | None
    in_circuit: Run

    def difference(self) -> float | None:
        """In-circuit value relative to the isolated one, minus 1.

        None when there is no isolated run, a value is missing or the kind
        changes (see :meth:`kind_changes`).
        """
        if self.isolated is None or self.kind_changes():
            return None
        a, b = self.isolated.reading.value, self.in_circuit.reading.value
        if a is None or b is None or a == 0 or not (math.isfinite(a) and math.isfinite(b)):
            return None
        return b / a - 1.0

    def kind_changes(self) -> bool:
        return self.isolated is not None and self.isolated.reading.kind != self.in_circuit.reading.kind

    def to_dict(self) -> dict:
        """The prediction as plain JSON-ready data."""
        return {
            "part": self.part,
            "probes": list(self.probes),
            "engine": self.engine,
            "isolated": reading_dict(self.isolated.reading if self.isolated else None),
            "in_circuit": reading_dict(self.in_circuit.reading),
        }


def default_probes(board: Board, part: str) -> tuple[str, ...]:
    """The part's pin nets in pin order (probe 1 on the first pin); a
    transistor's first three (C B E, D G S: not its substrate or bulk)."""
    found = _part(board, part)
    if not found.pins:
        raise InputError(f"part {found.name} has no pins to probe", board.path)
    return tuple(found.pins[:3] if found.kind in THREE_TERMINAL else found.pins)


def _part(board: Board, name: str):
    try:
        return board.part(name)
    except KeyError:
        raise InputError(f"no part {name!r} on board {board.name!r}", board.path) from None


def _check_nets(board: Board, nets: Sequence[str]) -> tuple[str, ...]:
    known = set(board.nets)
    out = tuple(str(n).upper() for n in nets)
    for net in out:
        if net not in known:
            raise InputError(f"no net {net!r} on board {board.name!r}", board.path)
    return out


def identify(board: Board, probe_nets: Sequence[str], profile: Profile | None = None,
             engine: str = "analytic", *, trace_points: int = 16) -> Run:
    """One identification run with the probes on ``probe_nets``.

    ``trace_points`` samples per step feed :meth:`Run.trace` (0: none).
    Raises InputError for an unknown net or engine, EngineError when the
    board cannot be simulated.
    """
    nets = _check_nets(board, probe_nets)
    if len(nets) not in (2, 3):
        raise EngineError(f"identification with {len(nets)} probes is not modelled",
                          hint="probe two or three nets")
    profile = profile or load_profile()
    if len(nets) == 3 and engine == "analytic":
        unread = channel_probed(board, nets)
        if unread is not None:
            return Run(unread, ())
    session = get_engine(engine).open(board, nets, profile.port_stray_farads)
    if len(nets) == 3:
        reading, steps = run_three_terminal(session, profile, trace_points)
        if engine == "analytic":
            reading = analytic_limits(board, reading, steps)
        return Run(reading, steps)
    reading, steps = run_identification(session, profile, trace_points)
    return Run(reading, steps)


def predict(board: Board, part: str, probes: Sequence[str] | None = None,
            profile: Profile | None = None, engine: str = "analytic", *,
            trace_points: int = 16) -> Prediction:
    """The reading on ``part`` alone and in circuit.

    ``probes`` defaults to the part's pin nets; the isolated run is None when
    a probe is not on one of the part's pins.
    """
    found = _part(board, part)
    nets = _check_nets(board, probes if probes is not None else default_probes(board, found.name))
    profile = profile or load_profile()
    isolated = None
    if all(n in found.pins for n in nets):
        isolated = identify(board.only(found.name), nets, profile, engine, trace_points=trace_points)
    in_circuit = identify(board, nets, profile, engine, trace_points=trace_points)
    return Prediction(found.name, nets, engine, isolated, in_circuit)


def predict_between(board: Board, net_a: str, net_b: str, profile: Profile | None = None,
                    engine: str = "analytic", *, trace_points: int = 16) -> Prediction:
    """The reading with the probes on two nets (no part, no isolated run)."""
    nets = _check_nets(board, (net_a, net_b))
    run = identify(board, nets, profile, engine, trace_points=trace_points)
    return Prediction(None, nets, engine, None, run)
