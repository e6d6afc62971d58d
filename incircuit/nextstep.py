"""The next measurement: the one that best tells two explanations apart.

Candidates, cheapest first: clip the tester onto a suspected neighbour;
repeat the judge's bench advice (:func:`incircuit.judge.advice.advise`: a
low-voltage multimeter range keeps junctions off, an LCR meter sees a
capacitance beside a resistance, a guard net takes a path out); follow
the judge's lift plan (:func:`incircuit.judge.lift.lift_candidates`: one
leg of the part, or of a neighbour on its paths) and measure again.

For each candidate the two leading hypotheses each predict a reading. The
separation is ``|ln v1 - ln v2| / sigma``, with ``sigma`` the log-spread of
healthy boards at that measurement (a small Monte Carlo band of
:data:`NEXT_STEP_SAMPLES` samples, plus the model allowance); readings of
different kinds count as :data:`KIND_SEPARATION`. The candidate with the
largest separation wins; separations above :data:`SEPARATION_ENOUGH` count
as equal, so the cheaper measurement wins among those that settle it.
Below one sigma no measurement separates them and the advice is to
desolder the part and test it alone.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Callable, Sequence

from .bands import healthy_band
from .bench import BenchReading, bench_profiles, diode_drop, impedance, lcr_reading, ohms
from .errors import EngineError
from .judge.advice import Advice, advise
from .judge.lift import LiftAction, lift_candidates
from .likelihood import MODEL_SIGMA, combine_sigma
from .model import Board, Reading
from .units import format_value

__all__ = ["NextStep", "next_step", "separation", "lift_leg", "NEXT_STEP_SAMPLES",
           "SEPARATION_ENOUGH", "KIND_SEPARATION"]

#: Monte Carlo samples of the healthy band at each candidate measurement.
NEXT_STEP_SAMPLES = 60
#: Separations (in sigma) above this settle the question equally well.
SEPARATION_ENOUGH = 4.0
#: Separation given to two predictions of different kinds.
KIND_SEPARATION = 10.0

Reader = Callable[[Board, tuple[str, ...]], Reading]

_COST = {"probe": 0, "instrument": 1, "lift": 2}
_BENCH_KINDS = {"R": "resistor", "rs": "resistor", "rp": "resistor", "cs": "capacitor",
                "cp": "capacitor", "ls": "inductor", "lp": "inductor", "Vf": "diode"}


@dataclass(frozen=True)
class NextStep:
    """A measurement to make next and what each leading hypothesis predicts."""

    action: str
    description: str
    probes: tuple[str, ...] = ()
    lift: tuple[str, int] | None = None
    instrument: str | None = None
    expected: tuple[tuple[str, Reading | None], ...] = ()
    separation: float | None = None

    def text(self) -> str:
        out = self.description
        if self.expected:
            said = "; ".join(f"if {label}: {_show(r)}" for label, r in self.expected)
            out += f" ({said})"
        return out

    def to_dict(self) -> dict:
        return {
            "action": self.action,
            "description": self.description,
            "text": self.text(),
            "probes": list(self.probes),
            "lift": {"part": self.lift[0], "pin": self.lift[1]} if self.lift else None,
            "instrument": self.instrument,
            "expected": [{"hypothesis": label, "reading": r.to_dict() if r else None}
                         for label, r in self.expected],
            "separation": self.separation if self.separation is None or math.isfinite(self.separation)
            else None,
        }


@dataclass(frozen=True)
class _Candidate:
    action: str
    description: str
    probes: tuple[str, ...]
    change: Callable[[Board], Board]
    reader: Reader | None = None
    lift: tuple[str, int] | None = None
    instrument: str | None = None
    accuracy: Callable[[Reading], float] | None = None


def _show(r: Reading | None) -> str:
    if r is None:
        return "-"
    if r.value is None:
        return r.kind
    return f"{r.kind} {format_value(r.value, r.unit)}"


def lift_leg(board: Board, part: str, pin: int) -> Board:
    """``board`` with pin ``pin`` of ``part`` lifted; a leak or short that a
    fault added inside the part (``PART~...``) moves with the leg. A board
    without the part (an open hypothesis) is returned unchanged."""
    if not board.has_part(part):
        return board
    net = board.part(part).pins[pin - 1]
    out = board.lifted(part, pin)
    new = out.part(part).pins[pin - 1]
    for p in out.parts:
        if p.name.startswith(part + "~") and net in p.pins:
            out = out.with_part(replace(p, pins=tuple(new if n == net else n for n in p.pins)))
    return out


def _bench_reading(b: BenchReading) -> Reading:
    if b.value is None or not math.isfinite(b.value):
        return Reading("nothing")
    if b.value <= 0:
        return Reading("unreadable")
    return Reading(_BENCH_KINDS[b.quantity], b.value, extra={"accuracy": b.accuracy})


def _bench_accuracy(r: Reading) -> float:
    return float(r.extra.get("accuracy", 0.0))  # type: ignore[arg-type]


def _bench_reader(advice: Advice, board: Board, part: str) -> Reader:
    """Repeat the judge's advised bench measurement (same instrument,
    quantity, frequency and guard net) on any board."""
    prof = next(p for p in bench_profiles() if p.id == advice.instrument)
    shown = advice.reading
    anode, cathode = board.part(part).pins[:2]

    def read(b: Board, p: tuple[str, ...]) -> Reading:
        if shown.quantity == "R":
            return _bench_reading(ohms(b, p[0], p[1], prof, shown.guard))
        if shown.quantity == "Vf":
            return _bench_reading(diode_drop(b, anode, cathode, prof))
        eq, peaks = impedance(b, p[0], p[1], prof, float(shown.frequency or 0.0), shown.guard)
        return _bench_reading(lcr_reading(eq, shown.quantity, prof, shown.guard, peaks))

    return read


def _instruments(board: Board, part: str, probes: tuple[str, ...]) -> list[_Candidate]:
    """The judge's bench advice, one candidate per advised setting."""
    if len(probes) < 2:
        return []
    out: list[_Candidate] = []
    for advice in advise(board, part, probes):
        shown = advice.reading
        guard = f", guard on net {shown.guard}" if shown.guard else ""
        out.append(_Candidate(
            "instrument", f"measure {part} with the {advice.name} ({shown.setting}{guard})",
            probes[:2], lambda b: b, _bench_reader(advice, board, part), instrument=advice.instrument,
            accuracy=_bench_accuracy))
    return out


def _lifts(board: Board, part: str, probes: tuple[str, ...], suspects: Sequence[str]) -> list[_Candidate]:
    """The judge's lift plan (own legs first, then neighbours' legs on the
    paths), plus a leg of each suspect the plan leaves out."""
    plan = lift_candidates(board, part, probes)
    covered = {a.part for a in plan}
    for name in suspects:
        if name not in covered and name != part:
            pins = board.part(name).pins
            on_probe = [i for i, n in enumerate(pins, 1) if n in probes] or [1]
            plan.append(LiftAction(name, on_probe[0], pins[on_probe[0] - 1], False))
    out = []
    for action in plan:
        if action.own:
            lifted = f"{action.part}.PIN{action.pin}~LIFTED"
            nets = tuple(lifted if n == action.net else n for n in probes)
            what = "measure it again"
        else:
            nets, what = probes, f"measure {part} again"
        out.append(_Candidate(
            "lift", f"lift pin {action.pin} of {action.part} (off net {action.net}) and {what}", nets,
            lambda b, n=action.part, k=action.pin: lift_leg(b, n, k), lift=(action.part, action.pin)))
    return out


def _candidates(board: Board, part: str, probes: tuple[str, ...], suspects: Sequence[str]) -> list[_Candidate]:
    out: list[_Candidate] = []
    for name in suspects:
        pins = board.part(name).pins
        if name != part and len(set(pins)) == len(pins) and set(pins[:3]) != set(probes):
            out.append(_Candidate("probe", f"clip the tester onto {name} ({', '.join(pins[:3])})",
                                  tuple(pins[:3]), lambda b: b))
    out.extend(_instruments(board, part, probes))
    out.extend(_lifts(board, part, probes, suspects))
    return out


def _relative(reading: Reading, accuracy) -> float | None:
    """A reading's own instrument error as a log standard deviation (uniform
    within ± accuracy); inf where the instrument cannot say."""
    if accuracy is None or not reading.value:
        return None
    return abs(float(accuracy(reading))) / (reading.value * math.sqrt(3.0))


def separation(first: Reading, second: Reading, sigma: float) -> float:
    """How far apart two predicted readings are, in ``sigma`` (log units)."""
    if first.kind != second.kind:
        return KIND_SEPARATION
    if first.value is None or second.value is None:
        return 0.0
    return abs(math.log(first.value) - math.log(second.value)) / max(sigma, 1e-9)


def next_step(board: Board, part: str, probes: tuple[str, ...], leaders: Sequence, read: Reader,
              profile, engine: str, seed: int, accuracy=None) -> NextStep | None:
    """The best measurement to separate the two ``leaders`` (Scored
    hypotheses of different groups), or advice to test the part alone."""
    if len(leaders) < 2:
        return None
    hyps = [s.hypothesis for s in leaders]
    labels = [h.label() for h in hyps]
    suspects = [h.part for h in hyps if h.part]
    # predictions first; the optimistic separation (without the healthy
    # spread, which can only widen sigma) orders the costlier band runs
    found = []
    for cand in _candidates(board, part, probes, suspects):
        reader = cand.reader or read
        acc = cand.accuracy or accuracy
        try:
            preds = [reader(cand.change(h.apply(board)), cand.probes) for h in hyps]
        except (EngineError, KeyError, ValueError):
            continue
        sigma0 = combine_sigma(MODEL_SIGMA, *(_relative(p, acc) for p in preds))
        found.append(((min(separation(preds[0], preds[1], sigma0), SEPARATION_ENOUGH),
                       -_COST[cand.action]), cand, preds))
    found.sort(key=lambda f: f[0], reverse=True)
    best: tuple[tuple[float, int], _Candidate, list[Reading], float] | None = None
    for optimistic, cand, preds in found:
        if best is not None and optimistic <= best[0]:
            break
        if preds[0].kind != preds[1].kind:  # settled by the kinds, no band needed
            key = (min(KIND_SEPARATION, SEPARATION_ENOUGH), -_COST[cand.action])
            if best is None or key > best[0]:
                best = (key, cand, preds, KIND_SEPARATION)
            continue
        reader = cand.reader or read
        acc = cand.accuracy or accuracy
        try:
            band = healthy_band(cand.change(board), cand.probes, profile, engine, NEXT_STEP_SAMPLES,
                                seed, reader=lambda b, p=cand.probes, r=reader: r(b, p), accuracy=acc)
        except (EngineError, KeyError, ValueError):
            continue
        stats = band.kinds.get(preds[0].kind) or band.kinds.get(band.kind)
        sigma = combine_sigma(stats.log_sigma if stats else None, MODEL_SIGMA,
                              *(_relative(p, acc) for p in preds))
        sep = separation(preds[0], preds[1], sigma)
        key = (min(sep, SEPARATION_ENOUGH), -_COST[cand.action])
        if best is None or key > best[0]:
            best = (key, cand, preds, sep)
    if best is None or best[3] < 1.0:
        return NextStep("remove", f"no measurement on the board separates {labels[0]} from "
                        f"{labels[1]}: desolder {part} and test it alone",
                        expected=tuple(zip(labels, best[2])) if best else ())
    _, cand, preds, sep = best
    return NextStep(cand.action, cand.description, cand.probes, cand.lift, cand.instrument,
                    tuple(zip(labels, preds)), sep)
