"""Two of three probes: the two-terminal identification inside a three-probe run.

When the three-probe identification finds no transistor it reads the part
between the two probes that conduct, with the third one left floating, by
running the ordinary two-terminal decision tree (:mod:`.identify`) on a
:class:`PairSession`: a view of the three-probe session whose probe 1 and
probe 2 are two chosen probes. Every step it runs is recorded with the full
three-probe drive and result, so the run's trace keeps one column per probe.

>>> from incircuit.engines import get_engine
>>> from incircuit.model import Board, Part
>>> from incircuit.tester.profile import load_profile
>>> board = Board("t", (Part("R1", "R", ("B", "C"), 10e3), Part("R2", "R", ("A", "Z"), 1e3)))
>>> s = get_engine("analytic").open(board, ("A", "B", "C"), 30e-12)
>>> bench = Bench(s, load_profile(), trace_points=0)
>>> r = identify_pair(bench, 1, 2)
>>> r.kind, round(r.value, -2), r.extra["probes"], len(bench.records[0].drive)
('resistor', 10000.0, [2, 3], 3)
"""

from __future__ import annotations

from dataclasses import replace
from typing import Sequence

from ..engines.base import Drive, Session, StepResult, Watch
from .bench import Bench, StepRecord
from .identify import run_identification

__all__ = ["PairSession", "identify_pair", "PROBE_KEYS"]

#: Reading extras that hold a probe number (1 or 2 inside the pair run).
PROBE_KEYS = ("anode", "cathode")


class PairSession:
    """Probes ``a`` and ``b`` of ``session`` as a two-probe session (the rest float)."""

    def __init__(self, session: Session, a: int, b: int):
        self.inner = session
        self.pair = (a, b)
        self.probe_nets = (session.probe_nets[a], session.probe_nets[b])
        #: Three-probe (drive, result, watch) of every step, in order.
        self.raw: list[tuple[Drive, StepResult, Watch | None]] = []

    def run(self, drive: Drive, duration: float, *, watch: Watch | None = None,
            sample_times: Sequence[float] = ()) -> StepResult:
        a, b = self.pair
        full: list = [None] * len(self.inner.probe_nets)
        full[a], full[b] = drive
        outer = None
        if watch is not None:
            minus = None if watch.minus is None else self.pair[watch.minus]
            outer = replace(watch, probe=self.pair[watch.probe], minus=minus)
        result = self.inner.run(tuple(full), duration, watch=outer, sample_times=sample_times)
        self.raw.append((tuple(full), result, outer))
        return StepResult(result.duration, result.crossed, (result.volts[a], result.volts[b]),
                          result.samples[:, [a, b]], result.nets)


def identify_pair(bench: Bench, a: int, b: int):
    """The two-terminal reading between probes ``a`` and ``b`` (0-based).

    The steps join ``bench``'s records (named ``"probes A,B: ..."``) and
    its clock; probe numbers in the reading's extras are the real ones,
    and ``extra["probes"]`` names the pair.
    """
    pair = PairSession(bench.session, a, b)
    reading, records = run_identification(pair, bench.profile, bench.trace_points)
    start = bench.time
    for rec, (drive, result, watch) in zip(records, pair.raw):
        bench.records.append(StepRecord(
            f"probes {a + 1},{b + 1}: {rec.name}", drive, result, start + rec.t_start,
            rec.sample_times, watch, rec.sampled, rec.formula))
    if records:
        bench.time = start + records[-1].t_end
    number = {1: a + 1, 2: b + 1}
    extra = dict(reading.extra)
    for key in PROBE_KEYS:
        if extra.get(key) in number:
            extra[key] = number[extra[key]]  # type: ignore[index]
    extra["probes"] = [a + 1, b + 1]
    return replace(reading, extra=extra)
