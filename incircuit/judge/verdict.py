"""The verdict on one part and probe pair, and everything that explains it.

:func:`judge` takes a :class:`~incircuit.predict.Prediction` (the isolated
and in-circuit readings) and adds:

* the verdict, "reliable", "predictable" or "masked" (:func:`classify`,
  rules and numbers in :mod:`.thresholds`);
* the sensitivity (:mod:`.sensitivity`);
* reasons in plain words (:mod:`.reasons`);
* fault detectability against a healthy band (:mod:`.detect`,
  :mod:`.band`; pass ``band=`` to use another band, e.g. Monte Carlo);
* the lift plan (:mod:`.lift`), each candidate predicted and ranked;
* bench instrument advice (:mod:`.advice`).

Every identification run goes through one cache (:class:`.runs.Runs`).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field, replace
from functools import partial
from typing import Sequence

from ..chips import uncertainty_reasons
from ..model import Board, Part, Reading
from ..predict import identify as _identify
from ..units import format_value
from .advice import Advice, advise
from .band import HealthyBand, ToleranceBand, part_tolerance
from .detect import FaultOutcome, fault_outcomes
from .lift import LiftAction, lift_candidates
from .reasons import (
    conducting_junctions, current_share, deviation_reason, junction_reasons, path_reasons,
    reading_text, share_reason,
)
from .runs import Runs
from .sensitivity import Sensitivity, one_sided, sensitivity
from .thresholds import MASKED_SENSITIVITY, VERDICT_RANK
from .transistor import pins_reason, transistor_reasons

__all__ = ["Judgement", "LiftOutcome", "judge", "classify", "reliable_window"]


def _jsonable(value: object) -> object:
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, dict):
        return {str(k): _jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_jsonable(v) for v in value]
    if hasattr(value, "item") and callable(value.item):  # numpy scalars
        return _jsonable(value.item())
    return value


def reliable_window(iso: Reading, part: Part, accuracy: float) -> tuple[float, float] | None:
    """Values an in-circuit reading may take and still count as the part's
    own: the isolated reading's tolerance band widened by ``accuracy``."""
    if iso.value is None:
        return None
    minus, plus, _ = part_tolerance(part)
    lo, hi = sorted((iso.value * (1 - minus), iso.value * (1 + plus)))
    return lo - accuracy, hi + accuracy


def classify(iso: Reading, inc: Reading, s: float | None, part: Part, accuracy: float) -> tuple[str, str]:
    """``(verdict, why)``. Masked first (a reading the engine cannot make,
    kind changes, a transistor's pins found differently, or ``|S|`` below
    :data:`~.thresholds.MASKED_SENSITIVITY`), then reliable (inside
    :func:`reliable_window`), else predictable."""
    needs = inc.extra.get("needs") or iso.extra.get("needs")
    if needs:
        return "masked", (f"the engine used cannot simulate what this reading needs (see the reading): "
                          f"run with --engine {needs} for a verdict")
    if iso.kind != inc.kind:
        return "masked", f"the reading changes kind: {reading_text(inc)} instead of {reading_text(iso)}"
    pins = pins_reason(iso, inc)
    if pins:
        return "masked", f"{pins}: the reading is not of the part's own junctions"
    if s is not None and abs(s) < MASKED_SENSITIVITY:
        return "masked", (f"the reading hardly follows {part.name} (sensitivity {s:.2f}, below "
                          f"{MASKED_SENSITIVITY:g}): a fault of {part.name} would not show")
    window = reliable_window(iso, part, accuracy)
    if window is None or inc.value is None:
        if inc.value is None and iso.value is None:
            return "reliable", f"{part.name} reads {reading_text(inc)} in circuit as alone"
        return "predictable", "the reading has no value to compare"
    lo, hi = window
    if lo <= inc.value <= hi:
        return "reliable", (f"{reading_text(inc)} lies within {part.name}'s tolerance and the "
                            f"instrument's accuracy of {reading_text(iso)} "
                            f"({format_value(lo, inc.unit)} .. {format_value(hi, inc.unit)})")
    why = (f"{reading_text(inc)} is outside {format_value(lo, inc.unit)} .. "
           f"{format_value(hi, inc.unit)}, but a change of {part.name} still moves it")
    if s is not None:
        why += f" (sensitivity {s:.2f})"
    return "predictable", why + ": compare with the predicted in-circuit value"


@dataclass(frozen=True)
class LiftOutcome:
    """One lift candidate, its predicted reading and the verdict it reaches."""

    action: LiftAction
    reading: Reading | None
    verdict: str
    probes: tuple[str, ...]
    sensitivity: float | None = None

    def to_dict(self) -> dict:
        return {"action": self.action.describe(), "verdict": self.verdict,
                "reading": self.reading.to_dict() if self.reading else None,
                "probes": list(self.probes), "sensitivity": self.sensitivity,
                **{k: v for k, v in self.action.to_dict().items() if k != "text"}}


@dataclass(frozen=True)
class Judgement:
    """Everything the judge found for one part on one set of probes."""

    part: str
    probes: tuple[str, ...]
    verdict: str
    sensitivity: Sensitivity
    reasons: tuple[str, ...]
    faults: tuple[FaultOutcome, ...]
    lift: tuple[LiftOutcome, ...]
    advice: tuple[Advice, ...]
    band: object
    cost: dict = field(default_factory=dict)

    def to_dict(self) -> dict:
        """Plain JSON-ready data (non-finite numbers as None)."""
        band = self.band
        return _jsonable({
            "verdict": self.verdict,
            "sensitivity": self.sensitivity.value,
            "sensitivity_detail": self.sensitivity.to_dict(),
            "reasons": list(self.reasons),
            "faults": [f.to_dict() for f in self.faults],
            "healthy_band": band.to_dict() if hasattr(band, "to_dict") else str(band),  # type: ignore[attr-defined]
            "lift": [x.to_dict() for x in self.lift],
            "advice": [a.to_dict() for a in self.advice],
            "advice_text": [a.text for a in self.advice],
            "cost": dict(self.cost),
        })  # type: ignore[return-value]

    def text_lines(self) -> list[str]:
        """The judgement for people, one item per line."""
        s = self.sensitivity.value
        lines = [f"verdict: {self.verdict}" + (f" (sensitivity {s:.2f})" if s is not None else "")]
        lines += [f"  - {r}" for r in self.reasons]
        describe = getattr(self.band, "describe", None)
        lines.append("faults" + (f" (healthy: {describe()})" if describe else "") + ":")
        for f in self.faults:
            shown = reading_text(f.reading, detail=True) if f.reading else f"not simulated ({f.error})"
            mark = "detectable" if f.detectable else "NOT detectable"
            lines.append(f"  {f.fault.describe():<24} -> {shown:<36} {mark}")
        lines.append("lift plan (best first):")
        for i, x in enumerate(self.lift[:5], 1):
            shown = reading_text(x.reading) if x.reading else "-"
            lines.append(f"  {i}. {x.action.describe()}: {x.verdict} ({shown})")
        lines.append("bench instruments:")
        lines += [f"  - {a.text}" for a in self.advice] or ["  - no bench instrument modelled for this part"]
        return lines


def _band(runs: Runs, board: Board, part: Part, probes: Sequence[str], inc: Reading,
          sens: Sensitivity, accuracy) -> ToleranceBand:
    """The in-circuit readings at the ends of the part's tolerance. A
    tolerance smaller than the sensitivity step is interpolated between the
    nominal and the perturbed readings (linear in the value, saving two
    runs); a semiconductor uses its perturbed readings."""
    readings: list[Reading | None] = [inc]
    if part.kind in ("R", "C", "L") and part.value:
        minus, plus, _ = part_tolerance(part)
        for factor, edge in ((1 - minus, sens.minus), (1 + plus, sens.plus)):
            frac = abs(factor - 1) / sens.step if sens.step else 2.0
            if frac <= 1.0 and edge is not None and edge.kind == inc.kind and None not in (
                    edge.value, inc.value):
                value = inc.value + (edge.value - inc.value) * frac  # type: ignore[operator]
                readings.append(replace(edge, value=value))
            else:
                readings.append(runs.try_reading(board.with_part(part.with_value(part.value * factor)),
                                                 probes))
    else:
        readings += [sens.plus, sens.minus]
    return ToleranceBand.of([r for r in readings if r is not None], accuracy)


def _lift(runs: Runs, board: Board, part: Part, probes: Sequence[str], iso: Reading,
          accuracy, all_neighbours: bool = False) -> list[LiftOutcome]:
    """Predict and rank the lift candidates. Neighbours are tried only when
    no leg of the part itself makes the reading reliable (they could not
    rank above it), unless ``all_neighbours``; then only those that do at
    least as well are kept."""
    out: list[LiftOutcome] = []
    own_reliable = False

    def candidates():
        yield from lift_candidates(board, part.name, probes, limit=0)
        if all_neighbours or not own_reliable:
            yield from lift_candidates(board, part.name, probes, own=False)

    for action in candidates():
        lifted, new_probes = action.apply(board, probes)
        reading = runs.try_reading(lifted, new_probes)
        if reading is None:
            continue
        window = reliable_window(iso, part, accuracy(reading))
        inside = (reading.kind == iso.kind and reading.value is not None and window is not None
                  and window[0] <= reading.value <= window[1])
        if not action.own and own_reliable and not inside:
            continue  # a neighbour that does worse than the part's own leg: not worth a run more
        s = None
        if reading.kind == iso.kind and reading.value is not None and not inside:
            s = one_sided(runs, lifted, part.name, new_probes, reading)
        verdict, _ = classify(iso, reading, s, part, accuracy(reading))
        own_reliable = own_reliable or (action.own and verdict == "reliable")
        out.append(LiftOutcome(action, reading, verdict, tuple(new_probes), s))

    def distance(x: LiftOutcome) -> float:
        if x.reading is None or x.reading.value is None or not iso.value:
            return float("inf")
        return round(abs(x.reading.value - iso.value) / abs(iso.value), 3)

    def crowding(x: LiftOutcome) -> int:
        # equal outcomes: the leg on the less crowded net (less copper to heat)
        return len(board.parts_on(x.action.net))
    return sorted(out, key=lambda x: (VERDICT_RANK[x.verdict], not x.action.own, distance(x), crowding(x)))


def judge(board: Board, part: str, prediction, profile, engine: str = "analytic",
          probes: Sequence[str] | None = None, *, band: HealthyBand | None = None,
          bench=None, identify=None, all_neighbours: bool = False) -> Judgement:
    """Judge ``part`` on ``probes`` (default: the prediction's probes).

    Parameters
    ----------
    prediction
        The :class:`~incircuit.predict.Prediction` for this part and probes.
    profile, engine
        Tester profile and engine name for the extra identification runs.
    band
        Healthy band for fault detection (anything with ``contains``);
        None builds a :class:`~.band.ToleranceBand`.
    bench
        Bench instrument profiles for the advice (None: the shipped ones).
    identify
        The identification function (default :func:`incircuit.predict.identify`
        without trace samples, which the judge does not need).
    all_neighbours
        Try lifting neighbours even when a leg of the part itself already
        makes the reading reliable (costs one run per neighbour).
    """
    started = time.perf_counter()
    if identify is None:
        identify = partial(_identify, trace_points=0)
    p = board.part(part)
    probes = tuple(probes if probes is not None else prediction.probes)
    runs = Runs(identify, profile, engine)
    runs.seed(board, probes, prediction.in_circuit)
    inc = prediction.in_circuit.reading
    if prediction.isolated is not None:
        runs.seed(board.only(p.name), probes, prediction.isolated)
        iso = prediction.isolated.reading
    else:
        # probes off the part's pins: the part alone on its own pins stands for it
        iso = runs.isolated(board, p.name, p.pins[:len(probes)]) or Reading("unreadable")
    accuracy = getattr(profile, "accuracy", lambda r: 0.0)

    sens = sensitivity(runs, board, p.name, probes, inc, iso)
    verdict, why = classify(iso, inc, sens.value, p, accuracy(inc))
    healthy = band if band is not None else _band(runs, board, p, probes, inc, sens, accuracy)
    faults = fault_outcomes(runs, board, p.name, probes, healthy)
    lift = _lift(runs, board, p, probes, iso, accuracy, all_neighbours)
    advice = advise(board, p.name, probes, bench)

    run = prediction.in_circuit
    reasons = [f"{p.name} is {verdict}: {why}", *uncertainty_reasons(board, probes),
               deviation_reason(p.name, iso, inc)]
    reasons += path_reasons(board, p.name, probes, iso, inc)
    reasons += _transistor_words(board, p, iso, inc, profile)
    reasons += junction_reasons(conducting_junctions(board, run), p.name, iso, inc)
    share = share_reason(p.name, current_share(board, p.name, run))
    if share:
        reasons.append(share)
    reasons.append(_sensitivity_words(p, sens))
    cost = {"runs_simulated": runs.calls, "runs_reused": runs.hits,
            "runs_failed": len(runs.failures), "seconds": round(time.perf_counter() - started, 4)}
    if runs.failures:
        reasons.append(f"{len(runs.failures)} of the extra simulations failed and were left out "
                       f"(first: {runs.failures[0]})")
    return Judgement(p.name, probes, verdict, sens, tuple(dict.fromkeys(reasons)), tuple(faults),
                     tuple(lift), tuple(advice), healthy, cost)


def _transistor_words(board: Board, part: Part, iso: Reading, inc: Reading, profile) -> list[str]:
    """The bias network of a transistor in closed form (:mod:`.transistor`)."""
    if part.kind not in ("Q", "M") or not hasattr(profile, "probe_ohms"):
        return []
    r_high = {k + 1: profile.port_high_ohms + profile.probe_ohms(k, "high") for k in range(3)}
    out = transistor_reasons(board, part.name, iso, profile.supply_volts, r_high)
    pins = pins_reason(iso, inc)
    return out + ([pins] if pins else [])


def _sensitivity_words(part: Part, sens: Sensitivity) -> str:
    if sens.value is None:
        return f"the in-circuit reading does not follow {part.name} smoothly: no sensitivity"
    moved = abs(sens.value) * sens.step * 100
    if sens.what == "value":
        return (f"a {sens.step * 100:.0f} % change of {part.name} moves the in-circuit reading by "
                f"{moved:.1f} % (sensitivity {sens.value:.2f})")
    return (f"a change of {part.name} ({sens.what}) that moves its own reading by "
            f"{sens.step * 100:.1f} % moves the in-circuit reading by {moved:.1f} % "
            f"(sensitivity {sens.value:.2f})")
