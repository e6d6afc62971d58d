"""One part of a survey: prediction, healthy band, judgement, remedy, traces.

:func:`survey_part` never raises for a failure inside the part's own work:
an :class:`~incircuit.errors.EngineError` or any other exception becomes a
record with ``status`` "error" (message, hint) and whatever was found
before it. A part the tester model cannot read yet (three or more probe
nets, no pins) is recorded as "unsupported".

The record (one row of survey.json) is the prediction's dict merged with
the judgement's dict, plus:

``kind``, ``pins``, ``value``, ``unit``, ``tolerance``, ``location``
    the part as the netlist gives it;
``status``, ``error``
    "ok", "error" or "unsupported"; ``{"type", "message", "hint"}`` or None;
``band``
    the healthy band of the reading, flattened for the expected-readings
    sheet: ``{"source", "kind", "unit", "low", "high", "median", "samples",
    "text"}`` ("monte-carlo" or "tolerance");
``faults_detectable``, ``faults_total``
    counts of the usual faults that show in circuit;
``remedy``
    the designer's change for a masked part (:mod:`.remedy`);
``uncertain``
    reasons the reading rests on guessed pin roles.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from typing import Mapping, Sequence

import numpy as np

from ..bands import Band, healthy_band
from ..chips import uncertainty_reasons
from ..errors import EngineError
from ..judge import judge
from ..judge.runs import board_key
from ..model import Board, Part
from ..predict import Prediction, Run, identify
from .remedy import remedy_for
from .settings import TRACE_POINTS, Settings

__all__ = ["PartResult", "survey_part", "probes_of", "band_for", "base_record", "STATUSES",
           "VERDICT_ORDER", "plain", "RunCache"]

#: Record statuses.
STATUSES = ("ok", "error", "unsupported")
#: Every value the ``verdict`` column can take, in report order.
VERDICT_ORDER = ("reliable", "predictable", "masked", "error", "unsupported")

_UNITS = {"R": "ohm", "C": "F", "L": "H", "K": "1"}


class RunCache:
    """Identification runs shared between the parts of one survey.

    Parts on the same nets ask for many of the same runs (the board as it
    is, the same neighbour lifted); the judge caches within one part, this
    across parts. Keyed by the board's content and the probe nets; a run
    with waveform samples also serves a request without. Bounded: a run
    keeps every net's voltage after every step, so the limit shrinks as
    boards grow (:meth:`for_board`); the oldest entries go first.
    """

    def __init__(self, profile, engine: str, limit: int = 256):
        self.profile, self.engine, self.limit = profile, engine, limit
        self._runs: dict[tuple, tuple[int, Run]] = {}
        self.hits = 0
        self.calls = 0

    @classmethod
    def for_board(cls, board: Board, profile, engine: str, net_budget: int = 20000) -> "RunCache":
        """A cache holding about ``net_budget`` net voltages per step in all."""
        return cls(profile, engine, max(8, net_budget // max(1, len(board.nets))))

    def identify(self, board: Board, probes: Sequence[str], profile=None, engine: str | None = None,
                 *, trace_points: int = 0) -> Run:
        """:func:`incircuit.predict.identify` through the cache (same signature)."""
        if profile is not None and profile is not self.profile or engine not in (None, self.engine):
            return identify(board, probes, profile, engine or self.engine, trace_points=trace_points)
        key = (board_key(board), tuple(probes))
        found = self._runs.get(key)
        if found is not None and found[0] >= trace_points:
            self.hits += 1
            self._runs[key] = self._runs.pop(key)  # most recently used last
            return found[1]
        self.calls += 1
        run = identify(board, probes, self.profile, self.engine, trace_points=trace_points)
        self._runs.pop(key, None)
        self._runs[key] = (trace_points, run)
        while len(self._runs) > self.limit:
            del self._runs[next(iter(self._runs))]
        return run

    def predict(self, board: Board, part: Part, probes: Sequence[str], trace_points: int) -> Prediction:
        """:func:`incircuit.predict.predict` through the cache: the part alone
        (when every probe is on one of its pins) and in circuit."""
        isolated = None
        if all(n in part.pins for n in probes):
            isolated = self.identify(board.only(part.name), probes, trace_points=trace_points)
        in_circuit = self.identify(board, probes, trace_points=trace_points)
        return Prediction(part.name, tuple(probes), self.engine, isolated, in_circuit)


@dataclass
class PartResult:
    """A part's record (plain JSON-ready data) and its waveforms for the plots."""

    record: dict
    traces: dict = field(default_factory=dict)


def plain(value: object) -> object:
    """``value`` as plain JSON data: numpy scalars unwrapped, non-finite floats None,
    mappings and sequences copied."""
    if isinstance(value, (np.floating, np.integer)):
        value = value.item()
    if isinstance(value, float):
        return value if np.isfinite(value) else None
    if isinstance(value, Mapping):
        return {str(k): plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain(v) for v in value]
    if isinstance(value, (str, int, bool)) or value is None:
        return value
    return str(value)


def probes_of(part: Part) -> tuple[str, ...] | None:
    """The probe nets the survey uses on ``part``: its pins in order, or
    None when there is nothing to probe (fewer than two distinct nets)."""
    nets = tuple(part.pins)
    if len(set(nets)) < 2:
        return None
    return nets


def _unsupported(record: dict, part: Part, error: EngineError | None) -> None:
    record["status"] = record["verdict"] = "unsupported"
    if error is not None:
        message, hint = f"not yet supported: {error.message}", error.hint
    elif part.kind == "X":
        message = (f"{part.name} is an unmodelled part ({part.model or 'no subcircuit'}): there is no "
                   "reading of it alone to compare with; its pins show in the readings of the parts "
                   "around it")
        hint = "test the chip itself by its function, or give it a subcircuit model"
    elif not part.pins:
        message, hint = f"not yet supported: {part.name} has no pins of its own to probe", ""
    else:
        message, hint = f"nothing to probe: every pin of {part.name} is on net {part.pins[0]}", ""
    record["error"] = {"type": "Unsupported", "message": message, "hint": hint}


def base_record(part: Part, engine: str) -> dict:
    """The fields every record has, whatever happened to the part."""
    tol = part.tolerance
    return {
        "part": part.name,
        "kind": part.kind,
        "pins": list(part.pins),
        "value": plain(part.value),
        "unit": _UNITS.get(part.kind),
        "model": part.model,
        "tolerance": ({"minus": tol.minus, "plus": tol.plus, "origin": tol.origin}
                      if tol is not None else None),
        "location": (f"{os.path.basename(part.location.path)}:{part.location.line}"
                     if part.location else None),
        "status": "ok",
        "error": None,
        "probes": list(part.pins),
        "engine": engine,
        "isolated": None,
        "in_circuit": None,
        "verdict": None,
        "sensitivity": None,
        "reasons": [],
        "faults": [],
        "faults_detectable": 0,
        "faults_total": 0,
        "band": None,
        "lift": [],
        "advice": [],
        "advice_text": [],
        "remedy": None,
        "uncertain": [],
    }


def band_for(board: Board, probes: Sequence[str], profile, settings: Settings) -> Band:
    """The Monte Carlo healthy band of ``probes`` at the survey's depth.

    Runs in the calling process (the survey spreads bands over its own
    worker processes).
    """
    return healthy_band(board, probes, profile, settings.engine, samples=settings.band_samples,
                        seed=settings.seed, workers=1)


def _flat_band(band: object, reading: Mapping | None) -> dict | None:
    """The band as ``{"source", "kind", "unit", "low", "high", "median", "samples", "text"}``."""
    describe = getattr(band, "describe", None)
    text = describe() if callable(describe) else str(band)
    if isinstance(band, Band):
        return plain({"source": "monte-carlo", "kind": band.kind, "unit": band.unit,
                      "low": band.low, "high": band.high, "median": band.median,
                      "kind_fraction": band.kind_fraction, "samples": band.samples, "text": text})
    ranges = getattr(band, "ranges", None)
    if not isinstance(ranges, Mapping) or not ranges:
        return None
    kind = reading.get("kind") if reading else None
    if kind not in ranges:
        kind = next(iter(ranges))
    rng = ranges[kind]
    margin = float(getattr(band, "margin", 0.0))
    low = high = None
    if rng is not None:  # no reading kind has a negative value: the accuracy can reach below 0
        low, high = max(0.0, rng[0] - margin * abs(rng[0])), rng[1] + margin * abs(rng[1])
    units = getattr(band, "units", None) or {}
    median = reading.get("value") if reading and reading.get("kind") == kind else None
    return plain({"source": "tolerance", "kind": kind, "unit": units.get(kind), "low": low,
                  "high": high, "median": median, "kind_fraction": None, "samples": None,
                  "text": text})


def _trace(run: Run | None) -> list[dict] | None:
    """The run's waveforms, step by step: ``name``, ``duration`` (s), ``x``
    (sample times as fractions of the step) and ``v`` (probe volts, one row
    per sample), ending with the step's final voltages."""
    if run is None:
        return None
    out = []
    for step in run.steps:
        duration = float(step.result.duration)
        rel = np.asarray(step.sample_times, dtype=float)
        rows = np.asarray(step.result.samples, dtype=float).reshape(len(rel), -1) if len(rel) else \
            np.zeros((0, len(step.result.volts)))
        keep = (rel <= duration * (1 + 1e-9)) & np.all(np.isfinite(rows), axis=1)
        x = np.append(rel[keep] / duration if duration > 0 else rel[keep] * 0.0, 1.0)
        v = np.vstack([rows[keep], np.asarray(step.result.volts, dtype=float).reshape(1, -1)])
        out.append({"name": step.name, "duration": duration, "x": x, "v": v})
    return out


def _error(record: dict, error: BaseException) -> None:
    record["status"] = "error"
    record["verdict"] = "error"
    hint = getattr(error, "hint", "") or ""
    if not hint and not isinstance(error, EngineError):
        hint = "an internal error in this part's work; the other parts are not affected"
    record["error"] = {"type": type(error).__name__,
                       "message": getattr(error, "message", None) or str(error), "hint": hint}


def survey_part(board: Board, name: str, profile, settings: Settings,
                band: Band | BaseException | None = None, runs: RunCache | None = None) -> PartResult:
    """Predict, judge and find a remedy for part ``name``.

    ``band`` is the Monte Carlo band of the part's probes (None: the
    judge's tolerance band; an exception: the band failed, the tolerance
    band is used and the failure is named in the reasons). ``runs`` shares
    identification runs with the other parts of the survey.
    """
    part = board.part(name)
    runs = runs or RunCache(profile, settings.engine, limit=64)
    record = base_record(part, settings.engine)
    result = PartResult(record)
    probes = probes_of(part)
    if probes is None or part.kind == "X":
        _unsupported(record, part, None)
        return result
    try:
        try:
            prediction = runs.predict(board, part, probes, TRACE_POINTS if settings.plots else 0)
        except EngineError as error:
            if len(probes) > 2:  # the tester model does not read this many probes yet
                _unsupported(record, part, error)
                return result
            raise
        record.update(plain(prediction.to_dict()))  # type: ignore[arg-type]
        if settings.plots:
            result.traces = {"isolated": _trace(prediction.isolated),
                             "in_circuit": _trace(prediction.in_circuit)}
        use_band = band if isinstance(band, Band) else None
        bench = None if settings.advice else ()
        judgement = judge(board, part.name, prediction, profile, settings.engine, probes,
                          band=use_band, identify=runs.identify, bench=bench)
        if judgement.verdict == "masked" and not any(not x.action.own for x in judgement.lift):
            # the remedy needs to know which neighbour masks the part: judge again with every
            # neighbour lifted in turn (the runs made so far come from the cache)
            judgement = judge(board, part.name, prediction, profile, settings.engine, probes,
                              band=use_band, identify=runs.identify, bench=bench, all_neighbours=True)
        found = plain(judgement.to_dict())
        assert isinstance(found, dict)
        cost = found.get("cost") or {}
        cost.pop("seconds", None)  # wall time would make the same inputs give different files
        record.update(found)
        if isinstance(band, BaseException):
            record["reasons"].append(
                f"the Monte Carlo band of {' - '.join(probes)} failed ({band}); faults are judged "
                f"against {part.name}'s tolerance band instead")
        record["band"] = _flat_band(judgement.band, record["in_circuit"])
        record["faults_total"] = len(record["faults"])
        record["faults_detectable"] = sum(bool(f.get("detectable")) for f in record["faults"])
        record["uncertain"] = uncertainty_reasons(board, probes)
        record["reasons"] += [r for r in record["uncertain"] if r not in record["reasons"]]
        record["remedy"] = remedy_for(board, part.name, probes, record)
    except Exception as error:  # one part's failure must not stop the survey
        _error(record, error)
    return result
