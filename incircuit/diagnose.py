"""Diagnosis: judge the reading a technician got and say whether to desolder.

:func:`diagnose` takes one or more observations (a reading on a pair of
probed nets), builds the hypotheses (:mod:`.hypotheses`: a healthy board;
open, short, fitted drift and fitted leakage of the part and of every
neighbour on the paths between the probed nets), scores each by the
likelihood of all readings together (:mod:`.likelihood`; the sum of
log-likelihoods over readings) times its prior, normalises the scores to
sum to 1 and decides:

``remove-and-test``
    the part's own faults together are at least :data:`MARGIN` times as
    probable as the runner-up (a healthy board or another part);
``leave-in-place``
    a healthy board is at least :data:`MARGIN` times as probable as the
    runner-up;
``look-elsewhere``
    a neighbour's faults are at least :data:`MARGIN` times as probable as
    the runner-up (the neighbour is named);
``inconclusive``
    otherwise, or when even the best hypothesis is more than
    :data:`Z_EXPLAINED` standard deviations off a reading or predicts
    another kind.

A fault that would leave every reading inside its healthy band (same kind,
within the band's limits) cannot be told from a healthy board by these
readings: it is listed, marked ``silent``, and counts with the healthy
board in the decision (a 10 Mohm leak across a capacitor that has a
100 kohm bleeder beside it changes nothing the tester can see).

Every decision comes with the next measurement that best separates the
two leading explanations (:mod:`.nextstep`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable, Sequence

from .bands import DIAGNOSE_SAMPLES, DEFAULT_SEED, Band, healthy_band
from .errors import EngineError, InputError
from .graph import between
from .hypotheses import Hypothesis, fit, hypotheses_for
from .likelihood import MODEL_SIGMA, Prediction, combine_sigma, log_likelihood
from .model import Board, Reading
from .nextstep import NextStep, next_step
from .predict import identify
from .readings import Observation
from .tester.profile import load_profile
from .units import format_value
from .workers import default_workers, map_all

__all__ = [
    "Observation",
    "Scored",
    "Diagnosis",
    "diagnose",
    "instrument_reader",
    "DECISIONS",
    "MARGIN",
    "Z_EXPLAINED",
    "MAX_NEIGHBOURS",
]

DECISIONS = ("remove-and-test", "leave-in-place", "look-elsewhere", "inconclusive")

#: The leading explanation must be this many times as probable as the
#: runner-up (explanations grouped by part) for a firm decision: 4:1 odds,
#: 80 % against 20 % when only the two remain. A project choice.
MARGIN = 4.0

#: A reading further than this many standard deviations from the best
#: hypothesis' prediction is not explained by any of them.
Z_EXPLAINED = 4.0

#: Most neighbours given fault hypotheses, nearest (shortest path) first.
MAX_NEIGHBOURS = 12

#: Fewest hypotheses per worker process that make forking worth it.
HYPOTHESES_PER_WORKER = 4

#: (board, probe nets) -> the reading the tester would show.
Reader = Callable[[Board, tuple[str, ...]], Reading]

_SQRT3 = math.sqrt(3.0)


@dataclass(frozen=True)
class Scored:
    """A hypothesis with its posterior ``score`` and its predicted readings
    (one per observation); ``worst_z`` is the largest distance in standard
    deviations from a reading (inf where the kind differs)."""

    hypothesis: Hypothesis
    score: float
    log_score: float
    predicted: tuple[Reading | None, ...]
    worst_z: float
    #: The fault leaves every reading inside its healthy band.
    silent: bool = False

    @property
    def group(self) -> str:
        """The explanation this counts for: a part, or "healthy"."""
        return "healthy" if self.silent or self.hypothesis.part is None else self.hypothesis.part

    def to_dict(self) -> dict:
        h = self.hypothesis
        first = self.predicted[0] if self.predicted else None
        out = {
            "part": h.part,
            "fault": h.fault,
            "value": h.value,
            "unit": h.unit if h.fault == "drift" else ("ohm" if h.fitted else None),
            "factor": h.amount if h.fault == "drift" else None,
            "label": h.label(),
            "score": self.score,
            "silent": self.silent,
            "predicted": first.to_dict() if first is not None else None,
        }
        if len(self.predicted) > 1:
            out["predicted_all"] = [p.to_dict() if p is not None else None for p in self.predicted]
        return out


@dataclass(frozen=True)
class Diagnosis:
    """The outcome: a decision, its reason, the ranked hypotheses, the
    healthy band of each reading and the next measurement."""

    board: str
    part: str
    observations: tuple[Observation, ...]
    bands: tuple[Band, ...]
    hypotheses: tuple[Scored, ...]
    groups: tuple[tuple[str, float], ...]
    decision: str
    reason: str
    next_step: NextStep | None
    notes: tuple[str, ...] = field(default_factory=tuple)

    def to_dict(self) -> dict:
        first = self.observations[0]
        return {
            "board": self.board,
            "part": self.part,
            "probes": list(first.probes),
            "reading": first.to_dict(),
            "readings": [o.to_dict() for o in self.observations],
            "decision": self.decision,
            "reason": self.reason,
            "hypotheses": [s.to_dict() for s in self.hypotheses],
            "groups": [{"part": None if g == "healthy" else g, "score": m} for g, m in self.groups],
            "band": self.bands[0].to_dict(),
            "bands": [b.to_dict() for b in self.bands],
            "next_step": self.next_step.to_dict() if self.next_step else None,
            "notes": list(self.notes),
        }


def instrument_reader(profile=None, engine: str = "analytic") -> Reader:
    """The three-probe tester's reading, by an identification run."""

    def read(board: Board, probes: tuple[str, ...]) -> Reading:
        return identify(board, probes, profile=profile, engine=engine).reading

    return read


def _safe(reader: Reader) -> Reader:
    """A reader that answers "nothing" when a probe touches no part (the
    part that held that net is open or lifted away)."""

    def read(board: Board, probes: tuple[str, ...]) -> Reading:
        nets = set(board.nets)
        if len(probes) == 2 and not all(p in nets for p in probes):
            return Reading("nothing")
        return reader(board, probes)

    return read


# -- predictions and likelihoods --------------------------------------------
def _prediction(pred: Reading, band: Band, accuracy) -> Prediction:
    """A fault hypothesis' single prediction with the healthy band's
    tolerance spread, the instrument's accuracy and the model allowance."""
    stats = band.kinds.get(pred.kind) or band.kinds.get(band.kind)
    s_circuit = stats.log_sigma_circuit if stats else None
    s_instr = None
    if accuracy is not None and pred.value:
        s_instr = abs(float(accuracy(pred))) / (pred.value * _SQRT3)
    esr = pred.extra.get("esr")
    step = pred.extra.get("esr_resolution")
    return Prediction(pred.kind, pred.value, combine_sigma(s_circuit, s_instr, MODEL_SIGMA),
                      esr=None if esr is None else float(esr),  # type: ignore[arg-type]
                      esr_sigma=None if step is None else float(step))  # type: ignore[arg-type]


def _healthy_prediction(band: Band, reading: Reading) -> Prediction:
    kinds = {k: s.fraction for k, s in band.kinds.items()}
    kind = reading.kind if band.kinds.get(reading.kind) and band.kinds[reading.kind].log_mean is not None \
        else band.kind
    s = band.kinds[kind]
    return Prediction(kind, s.median, combine_sigma(s.log_sigma, MODEL_SIGMA), kinds, s.log_mean,
                      s.esr_mean, combine_sigma(s.esr_sigma, s.esr_step) if s.esr_mean is not None else None)


def _z(reading: Reading, p: Prediction) -> float:
    if p.kind_probability(reading.kind) < 0.5:
        return math.inf
    if reading.value is None:
        return 0.0
    if p.mu is None or reading.kind != p.kind:
        return math.inf
    return abs(math.log(reading.value) - p.mu) / max(p.sigma, 1e-9)


# -- the hypothesis set -----------------------------------------------------
def _suspects(board: Board, part: str, observations: Sequence[Observation]) -> list[str]:
    """The diagnosed part, the parts named by observations, then the parts
    on paths between each observation's probed nets, nearest first."""
    named = [part] + [o.part for o in observations if o.part]
    seen: dict[str, int] = {}
    for obs in observations:
        nets = obs.probes
        for i in range(len(nets)):
            for j in range(i + 1, len(nets)):
                if nets[i] == nets[j]:
                    continue
                for path in between(board, nets[i], nets[j]).paths:
                    for name in path.parts:
                        seen[name] = min(seen.get(name, 99), len(path.parts))
    ordered = sorted(seen, key=lambda n: (seen[n], n))
    others = [n for n in ordered if n not in named][:MAX_NEIGHBOURS]
    return list(dict.fromkeys(named + others))


# -- the main entry ---------------------------------------------------------
def diagnose(board: Board, part: str, observations: Sequence[Observation], profile=None,
             engine: str = "analytic", samples: int = DIAGNOSE_SAMPLES, seed: int = DEFAULT_SEED,
             reader: Reader | None = None) -> Diagnosis:
    """Rank the explanations of ``observations`` and decide about ``part``.

    Parameters
    ----------
    board
        The board as its netlist describes it (healthy).
    part
        The part the technician suspects.
    observations
        One or more readings; each names its probed nets.
    profile
        The tester's profile (None: the shipped default); its accuracy
        widens the bands.
    engine, samples, seed
        Engine of the identification runs, Monte Carlo samples and seed
        of the healthy bands.
    reader
        ``(board, probes) -> Reading`` to use instead of the tester model.
    """
    if not observations:
        raise InputError("no reading to diagnose")
    if not board.has_part(part):
        raise InputError(f"no part {part!r} on board {board.name}", board.path)
    part = board.part(part).name
    if reader is None:
        profile = profile if profile is not None else load_profile()
        reader = instrument_reader(profile, engine)
    read = _safe(reader)
    accuracy = getattr(profile, "accuracy", None)
    notes: list[str] = []

    bands: dict[tuple[str, ...], Band] = {}
    for obs in observations:
        if obs.probes not in bands:
            bands[obs.probes] = healthy_band(board, obs.probes, profile, engine, samples, seed,
                                             reader=lambda b, p=obs.probes: read(b, p))
    obs_bands = [bands[o.probes] for o in observations]

    def score(h: Hypothesis, amount: float | None = None) -> tuple[float, list, list[Reading], float]:
        changed = h.apply(board, amount)
        total, info, preds, worst = 0.0, [], [], 0.0
        for obs, band in zip(observations, obs_bands):
            pred = read(changed, obs.probes)
            p = _prediction(pred, band, accuracy)
            total += log_likelihood(obs.reading, p)
            worst = max(worst, _z(obs.reading, p))
            ok = obs.reading.value and pred.value and pred.kind == obs.reading.kind
            info.append((math.log(pred.value), p.sigma) if ok else None)
            preds.append(pred)
        return total, info, preds, worst

    with_esr = any(o.reading.extra.get("esr") for o in observations)
    suspects = _suspects(board, part, observations)

    def evaluate(h: Hypothesis) -> tuple:
        """(hypothesis, log score, predicted rows, worst z, note) of one hypothesis."""
        try:
            if h.part is None:
                preds_h = [_healthy_prediction(b, o.reading) for o, b in zip(observations, obs_bands)]
                ll = sum(log_likelihood(o.reading, p) for o, p in zip(observations, preds_h))
                worst = max(_z(o.reading, p) for o, p in zip(observations, preds_h))
                medians = [Reading(b.kind, b.median) if b.median else Reading(b.kind) for b in obs_bands]
                return h, math.log(h.prior) + ll, _rows(medians), worst, None
            if h.fitted:
                f = fit(lambda u: score(h, math.exp(u))[:2], h.fault, targets)
                h = h.with_amount(f.amount)
                _, _, preds, worst = score(h)
                return h, math.log(h.prior) + f.log_marginal, _rows(preds), worst, None
            ll, _, preds, worst = score(h)
            return h, math.log(h.prior) + ll, _rows(preds), worst, None
        except EngineError as error:
            return h, None, (), math.inf, f"{h.label()}: not simulated ({error})"

    targets = [math.log(o.reading.value) if o.reading.value else None for o in observations]
    hyps = hypotheses_for(board, suspects, with_esr)
    results = map_all(evaluate, hyps, default_workers(engine), min_per_worker=HYPOTHESES_PER_WORKER)
    notes.extend(r[4] for r in results if r[4])
    raw = [(h, ls, tuple(Reading(*row) for row in rows), worst)
           for h, ls, rows, worst, _ in results if ls is not None]
    if not raw:
        raise EngineError(f"no hypothesis about {part} could be simulated", "try the other engine")
    top = max(r[1] for r in raw)
    weights = [math.exp(r[1] - top) for r in raw]
    total = sum(weights)
    ranked = sorted(
        (Scored(h, w / total, ls, preds, worst,
                h.part is not None and all(_inside(p, b) for p, b in zip(preds, obs_bands)))
         for (h, ls, preds, worst), w in zip(raw, weights)),
        key=lambda s: -s.score,
    )
    groups: dict[str, float] = {}
    for s in ranked:
        groups[s.group] = groups.get(s.group, 0.0) + s.score
    group_list = sorted(groups.items(), key=lambda g: -g[1])
    decision, reason = _decide(part, ranked, group_list)
    leaders = _leaders(ranked, group_list)
    step = next_step(board, part, observations[0].probes, leaders, read, profile, engine, seed,
                     accuracy)
    return Diagnosis(board.name, part, tuple(observations), tuple(obs_bands), tuple(ranked),
                     tuple(group_list), decision, reason, step, tuple(notes))


def _rows(readings: Sequence[Reading]) -> tuple[tuple, ...]:
    """Readings as plain tuples (they cross process boundaries)."""
    return tuple((r.kind, r.value, r.unit, dict(r.extra)) for r in readings)


def _inside(pred: Reading | None, band: Band) -> bool:
    """Whether a predicted reading lies inside the healthy band."""
    return pred is not None and band.contains(pred)


def _leaders(ranked: Sequence[Scored], groups: Sequence[tuple[str, float]]) -> list[Scored]:
    """The representative of each of the two leading groups: the healthy
    board itself for the healthy group, else the group's best hypothesis."""
    out: list[Scored] = []
    for name, _ in groups[:2]:
        members = [s for s in ranked if s.group == name]
        healthy = [s for s in members if s.hypothesis.part is None]
        out.append(healthy[0] if healthy else members[0])
    return out


def _pct(x: float) -> str:
    return f"{x * 100:.0f} %" if x >= 0.01 else "<1 %"


def _decide(part: str, ranked: Sequence[Scored], groups: Sequence[tuple[str, float]]) -> tuple[str, str]:
    best = ranked[0]
    lead, mass = groups[0]
    runner, runner_mass = groups[1] if len(groups) > 1 else ("nothing else", 0.0)
    ratio = mass / runner_mass if runner_mass > 0 else math.inf
    lead_best = _leaders(ranked, groups)[0]
    if lead_best.worst_z > Z_EXPLAINED:
        return "inconclusive", (
            f"no explanation fits: even the likeliest, {best.hypothesis.label()}, predicts "
            f"{_describe(best.predicted[0])}; check the probe nets, the board and its netlist")
    runner_text = "a healthy board" if runner == "healthy" else runner
    times = f"{ratio:.0f}x" if ratio < 1000 else "over 1000x"
    odds = "no other explanation" if math.isinf(ratio) else f"{times} {runner_text}"
    if ratio < MARGIN:
        pair = _leaders(ranked, groups)
        lead_text, second_text = ("a healthy board" if s.group == "healthy" else s.hypothesis.label()
                                  for s in pair)
        return "inconclusive", (
            f"{lead_text} ({_pct(mass)} for {_group_text(lead)}) and {second_text} "
            f"({_pct(runner_mass)} for {_group_text(runner)}) explain the readings about equally "
            f"well (odds {ratio:.1f}:1, below {MARGIN:g}:1)")
    if lead == "healthy":
        return "leave-in-place", f"a healthy board explains the readings ({_pct(mass)}; {odds})"
    if lead == part:
        return "remove-and-test", (
            f"{lead_best.hypothesis.label()} explains the readings ({_pct(mass)} for a fault "
            f"of {part}; {odds})")
    return "look-elsewhere", (
        f"{lead} is the likelier culprit: {lead_best.hypothesis.label()} ({_pct(mass)}; {odds})")


def _group_text(group: str) -> str:
    return "a healthy board" if group == "healthy" else f"a fault of {group}"


def _describe(reading: Reading | None) -> str:
    if reading is None:
        return "-"
    if reading.value is None:
        return reading.kind
    return f"{reading.kind} {format_value(reading.value, reading.unit)}"
