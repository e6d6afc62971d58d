"""Healthy bands: what good boards read, by Monte Carlo over the tolerances.

Every R, C and L that can carry current between the probed nets (see
:func:`piece_parts`) takes a value drawn independently
and **uniformly** between its tolerance limits ``value * (1 - minus)`` and
``value * (1 + plus)``; the instrument then adds a reading error drawn
uniformly within ``± Profile.accuracy(reading)``. Uniform (rectangular) is
the distribution to assume when only limits are known (JCGM 100:2008, the
GUM, 4.3.7); its standard deviation is ``half-width / sqrt(3)``.

The band is the ``QUANTILES`` (0.5 % and 99.5 %) percentiles of the values
of the samples whose reading kind is the most common one, with that kind's
share of the samples (``kind_fraction``). Sampling is seeded: the same
inputs give the same band.

Cost: one identification run per sample, spread over the CPU cores
(:mod:`.workers`; the analytic engine only). Where the probed piece of the
board holds junctions a run is slow (a tenth of a second and more); there
the samples go through a checked log-linear model instead
(:mod:`.surrogate`: one run per varied part plus eight check runs), and
the band says so. ``DIAGNOSE_SAMPLES`` (500) is the
default; surveys pass ``SURVEY_SAMPLES`` (100), whose 0.5/99.5 % tails rest
on about half a sample each and are therefore rougher; :meth:`Band.describe`
says how many samples a band rests on.

>>> import numpy as np
>>> from incircuit.model import Tolerance
>>> tol = [Tolerance.symmetric(0.05), Tolerance.symmetric(0.05)]
>>> out = monte_carlo(lambda v: v[:, 0] + v[:, 1], [100.0, 100.0], tol, 4000, seed=1)
>>> round(float(out.mean()), 0), bool(190 < out.min() and out.max() < 210)
(200.0, True)
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from itertools import combinations
from typing import Callable, Iterable, Mapping, Sequence

import networkx as nx
import numpy as np

from .errors import EngineError
from .model import Board, Part, Reading, Tolerance
from .predict import identify
from .tester.profile import load_profile
from .surrogate import linear_readings, needs_surrogate
from .units import format_value
from .workers import default_workers, read_all

__all__ = [
    "Band",
    "KindStats",
    "healthy_band",
    "band_from_readings",
    "monte_carlo",
    "sample_factors",
    "varied_parts",
    "piece_parts",
    "FALLBACK_SAMPLES",
    "DIAGNOSE_SAMPLES",
    "SURVEY_SAMPLES",
    "QUANTILES",
    "DEFAULT_SEED",
    "relative_width",
]

#: Samples for a diagnosis or a single prediction.
DIAGNOSE_SAMPLES = 500
#: The cheaper setting for surveys of whole boards.
SURVEY_SAMPLES = 100
#: Lower and upper percentile of the band, as fractions.
QUANTILES = (0.005, 0.995)
#: Seed used when none is given.
DEFAULT_SEED = 1
#: Samples of the full Monte Carlo run when the linear model fails its check.
FALLBACK_SAMPLES = SURVEY_SAMPLES

#: Reader: the reading a tester gives on a board (an identification run).
Reader = Callable[[Board], Reading]


@dataclass(frozen=True)
class KindStats:
    """Samples of one reading kind: share, percentiles and log-spread.

    ``log_mean``/``log_sigma`` are the mean and standard deviation of the
    natural log of the value (with the instrument's error);
    ``log_sigma_circuit`` leaves the instrument's error out. ``esr_mean``,
    ``esr_sigma`` (ohm, linear: a good capacitor's ESR reads 0) and
    ``esr_step`` (the ESR resolution) when the samples carry an ESR.
    """

    kind: str
    fraction: float
    count: int
    low: float | None = None
    high: float | None = None
    median: float | None = None
    log_mean: float | None = None
    log_sigma: float | None = None
    log_sigma_circuit: float | None = None
    esr_mean: float | None = None
    esr_sigma: float | None = None
    esr_step: float | None = None
    esr_low: float | None = None
    esr_high: float | None = None


@dataclass(frozen=True)
class Band:
    """What healthy boards read on one pair (or triple) of probed nets."""

    probes: tuple[str, ...]
    kind: str
    unit: str | None
    low: float | None
    high: float | None
    median: float | None
    kind_fraction: float
    samples: int
    seed: int
    quantiles: tuple[float, float] = QUANTILES
    #: Per reading kind seen among the samples, most common first.
    kinds: Mapping[str, KindStats] = field(default_factory=dict)
    #: Parts whose tolerance was sampled.
    varied: tuple[str, ...] = ()
    #: "full" (an identification run per sample) or "linear" (the checked
    #: model of :mod:`.surrogate`).
    method: str = "full"
    #: Identification runs made.
    runs: int = 0
    #: Largest log error of the linear model against its check runs.
    check_error: float | None = None
    #: d ln(reading) / d ln(value) per varied part (linear method only).
    slopes: Mapping[str, float] = field(default_factory=dict)
    #: Why the band is not what was asked for, if it is not.
    note: str = ""

    @property
    def log_sigma(self) -> float | None:
        stats = self.kinds.get(self.kind)
        return stats.log_sigma if stats else None

    def fraction(self, kind: str) -> float:
        """Share of samples that read as ``kind``."""
        stats = self.kinds.get(kind)
        return stats.fraction if stats else 0.0

    def contains(self, reading: Reading) -> bool:
        """Whether ``reading`` is of the band's kind and inside its limits
        (its ESR too, within one resolution step, when both have one)."""
        if reading.kind != self.kind:
            return False
        if reading.value is None or self.low is None or self.high is None:
            return reading.value is None and self.low is None
        if not self.low <= reading.value <= self.high:
            return False
        stats = self.kinds[self.kind]
        esr = reading.extra.get("esr")
        if esr is not None and stats.esr_low is not None and stats.esr_high is not None:
            step = stats.esr_step or 0.0
            return stats.esr_low - step <= float(esr) <= stats.esr_high + step  # type: ignore[arg-type]
        return True

    def describe(self) -> str:
        """One line, e.g. ``"capacitor 4.3 uF .. 5.2 uF (100 % of 500 samples, 0.5-99.5 %)"``."""
        lo, hi = self.quantiles
        where = f"{self.kind_fraction * 100:.0f} % of {self.samples} samples"
        if self.method == "linear":
            where += (f" of a linear model checked by full runs to {(self.check_error or 0) * 100:.1f} %"
                      f", {self.runs} runs")
        if self.samples < DIAGNOSE_SAMPLES:
            where += f"; fewer than the full {DIAGNOSE_SAMPLES}, tails are rough"
        if self.note:
            where += f"; {self.note}"
        if self.low is None:
            return f"{self.kind} ({where})"
        stats = self.kinds[self.kind]
        esr = ""
        if stats.esr_high is not None:
            esr = f", ESR up to {format_value(stats.esr_high + (stats.esr_step or 0.0), 'ohm')}"
        return (f"{self.kind} {format_value(self.low, self.unit)} .. {format_value(self.high, self.unit)}"
                f"{esr} ({where}, {lo * 100:g}-{hi * 100:g} percentiles)")

    def to_dict(self) -> dict:
        return {
            "probes": list(self.probes),
            "kind": self.kind,
            "unit": self.unit,
            "low": self.low,
            "high": self.high,
            "median": self.median,
            "kind_fraction": self.kind_fraction,
            "kinds": {k: s.fraction for k, s in self.kinds.items()},
            "samples": self.samples,
            "seed": self.seed,
            "quantiles": list(self.quantiles),
            "log_sigma": self.log_sigma,
            "method": self.method,
            "runs": self.runs,
            "check_error": self.check_error,
            "note": self.note,
        }


# -- the sampling machinery -------------------------------------------------
def sample_factors(tolerances: Sequence[Tolerance | None], samples: int,
                   rng: np.random.Generator) -> np.ndarray:
    """Multiplying factors, shape ``(samples, len(tolerances))``, each column
    uniform on ``[1 - minus, 1 + plus]`` (1 where the tolerance is None)."""
    lo = np.array([1.0 - (t.minus if t else 0.0) for t in tolerances])
    hi = np.array([1.0 + (t.plus if t else 0.0) for t in tolerances])
    return lo + (hi - lo) * rng.random((samples, len(tolerances)))


def monte_carlo(func: Callable[[np.ndarray], np.ndarray], nominal: Sequence[float],
                tolerances: Sequence[Tolerance | None], samples: int = DIAGNOSE_SAMPLES,
                seed: int = DEFAULT_SEED) -> np.ndarray:
    """``func`` of sampled values: ``func`` takes an array ``(samples, n)``
    and returns ``(samples,)``; vectorised, for closed-form readings."""
    rng = np.random.default_rng(seed)
    values = np.asarray(nominal, dtype=float) * sample_factors(tolerances, samples, rng)
    return np.asarray(func(values), dtype=float)


def piece_parts(board: Board, probes: Sequence[str]) -> tuple[Part, ...]:
    """The parts that can carry current between the probed nets.

    The board is a graph of nets joined by parts (every pin pair of a part
    with more pins; the windings of a coupling joined to each other); with
    the probed nets joined as well, the parts inside the biconnected block
    that holds the probes are the ones on some loop through the probes
    (Hopcroft & Tarjan, "Efficient algorithms for graph manipulation",
    CACM 16 (1973), via networkx). A part hanging off the block by a single
    net carries no current between the probes (the board floats; only the
    probed nets reach the tester).
    """
    nets = [n.upper() for n in probes]
    g = nx.Graph()
    pins_of = {p.name: p.pins for p in board.parts}
    for p in board.parts:
        pins = list(dict.fromkeys(p.pins))
        if p.kind == "K":
            names = [str(n).upper() for n in p.params.get("inductors", ())]  # type: ignore[union-attr]
            pins = list(dict.fromkeys(n for name in names for n in pins_of.get(name, ())))
        g.add_edges_from(combinations(pins, 2))
    g.add_edges_from(combinations(dict.fromkeys(nets), 2))
    block = next((b for b in nx.biconnected_components(g) if set(nets) <= b), set(nets))
    inductors = set()
    for p in board.parts:
        if p.kind == "K":
            names = [str(n).upper() for n in p.params.get("inductors", ())]  # type: ignore[union-attr]
            if all(len(set(pins_of.get(n, ())) & block) >= 2 for n in names):
                inductors.update(names)
    return tuple(p for p in board.parts
                 if len(set(p.pins) & block) >= 2 or p.name in inductors)


def varied_parts(board: Board, probes: Sequence[str]) -> tuple[Part, ...]:
    """The R, C, L parts of :func:`piece_parts` with a value and a
    tolerance: only they move the reading."""
    return tuple(
        p for p in piece_parts(board, probes)
        if p.kind in ("R", "C", "L") and p.value is not None and p.tolerance is not None
        and (p.tolerance.minus > 0 or p.tolerance.plus > 0)
    )


def _boards(board: Board, parts: Sequence[Part], values: np.ndarray) -> Iterable[Board]:
    index = {p.name: i for i, p in enumerate(board.parts)}
    base = list(board.parts)
    for row in values:
        changed = list(base)
        for part, value in zip(parts, row):
            changed[index[part.name]] = part.with_value(float(value))
        yield replace(board, parts=tuple(changed))


# -- readings to a band -----------------------------------------------------
def _log_stats(values: np.ndarray) -> tuple[float | None, float | None]:
    values = values[np.isfinite(values) & (values > 0)]
    if values.size == 0:
        return None, None
    logs = np.log(values)
    return float(logs.mean()), float(logs.std(ddof=1)) if values.size > 1 else 0.0


def band_from_readings(readings: Sequence[Reading], probes: Sequence[str] = (),
                       accuracy: Callable[[Reading], float] | None = None,
                       seed: int = DEFAULT_SEED, quantiles: tuple[float, float] = QUANTILES,
                       varied: Sequence[str] = ()) -> Band:
    """The band of a list of simulated readings, after adding the
    instrument's error (uniform within ``± accuracy(reading)``)."""
    if not readings:
        raise ValueError("no readings to make a band of")
    rng = np.random.default_rng([seed, 1])  # a stream of its own, apart from the tolerances
    n = len(readings)
    kinds = [r.kind for r in readings]
    order = sorted(set(kinds), key=lambda k: (-kinds.count(k), k))
    stats: dict[str, KindStats] = {}
    for kind in order:
        chosen = [r for r in readings if r.kind == kind]
        count = len(chosen)
        values = np.array([r.value if r.value is not None else np.nan for r in chosen], dtype=float)
        if np.all(np.isnan(values)):
            stats[kind] = KindStats(kind, count / n, count)
            continue
        clean = values.copy()
        if accuracy is not None:
            half = np.array([abs(float(accuracy(r))) if r.value is not None else 0.0 for r in chosen])
            noisy = values + half * (2.0 * rng.random(count) - 1.0)
            # an error bigger than the reading leaves the smallest figure shown
            values = np.where(noisy > 0, noisy, np.minimum(values, half) * 1e-3)
        ok = values[np.isfinite(values)]
        mean, sigma = _log_stats(values)
        _, sigma_circuit = _log_stats(clean)
        esr = np.array([float(r.extra["esr"]) for r in chosen if r.extra.get("esr") is not None],  # type: ignore[arg-type]
                       dtype=float)
        steps = [float(r.extra["esr_resolution"]) for r in chosen if r.extra.get("esr_resolution")]  # type: ignore[arg-type]
        esr_mean = esr_sigma = esr_step = esr_low = esr_high = None
        if esr.size > count // 2:
            esr_mean, esr_sigma = float(esr.mean()), float(esr.std(ddof=1)) if esr.size > 1 else 0.0
            esr_step = float(np.median(steps)) if steps else None
            esr_low, esr_high = (float(np.quantile(esr, q)) for q in quantiles)
        stats[kind] = KindStats(
            kind, count / n, count,
            float(np.quantile(ok, quantiles[0])), float(np.quantile(ok, quantiles[1])),
            float(np.median(ok)), mean, sigma, sigma_circuit, esr_mean, esr_sigma, esr_step,
            esr_low, esr_high,
        )
    top = stats[order[0]]
    unit = next((r.unit for r in readings if r.kind == top.kind and r.unit), None)
    return Band(tuple(probes), top.kind, unit, top.low, top.high, top.median, top.fraction, n,
                seed, tuple(quantiles), stats, tuple(varied))  # type: ignore[arg-type]


def healthy_band(board: Board, probes: Sequence[str], profile=None, engine: str = "analytic",
                 samples: int = DIAGNOSE_SAMPLES, seed: int = DEFAULT_SEED,
                 quantiles: tuple[float, float] = QUANTILES, reader: Reader | None = None,
                 accuracy: Callable[[Reading], float] | None = None,
                 workers: int | None = None, method: str = "auto") -> Band:
    """Monte Carlo band of healthy readings on ``probes``.

    Parameters
    ----------
    board, probes
        The board and the probed nets (two or three).
    profile
        Instrument profile (None: the shipped default); its ``accuracy``
        adds the reading error.
    engine
        Engine name for the identification runs.
    samples
        Number of sampled boards (:data:`DIAGNOSE_SAMPLES`, or
        :data:`SURVEY_SAMPLES` for the cheaper survey setting).
    seed
        Seed of the sampling; the same inputs give the same band.
    reader
        Function ``board -> Reading`` to use instead of an identification run
        (another instrument, a closed-form model).
    accuracy
        The instrument's absolute accuracy of a reading, instead of
        ``profile.accuracy``.
    workers
        Processes for the runs (None: :func:`default_workers`).
    method
        "full": one run per sample; "linear": the checked model of
        :mod:`.surrogate` (full runs of :data:`FALLBACK_SAMPLES` samples
        when its check fails); "auto": linear where runs are slow (a
        junction on the probed piece, or an engine other than the
        analytic one), else full.
    """
    if samples < 2:
        raise ValueError("a band needs at least two samples")
    probes = tuple(n.upper() for n in probes)
    if reader is None:
        profile = profile if profile is not None else load_profile()

        def reader(b: Board) -> Reading:
            return identify(b, probes, profile=profile, engine=engine).reading

    parts = varied_parts(board, probes)
    rng = np.random.default_rng(seed)
    nominal = np.array([float(p.value) for p in parts])  # type: ignore[arg-type]
    values = nominal * sample_factors([p.tolerance for p in parts], samples, rng)
    if workers is None:
        workers = default_workers(engine)
    accuracy = accuracy or getattr(profile, "accuracy", None)
    read = _tolerant(reader)
    names = [p.name for p in parts]
    if method == "auto":
        slow = engine != "analytic" or needs_surrogate(piece_parts(board, probes))
        method = "linear" if slow else "full"
    if method == "linear":
        result = linear_readings(read, board, parts, values / nominal, workers, quantiles)
        if result is not None:
            band = band_from_readings(result.readings, probes, accuracy, seed, quantiles, names)
            return replace(band, method="linear", runs=result.runs, check_error=result.check_error,
                           slopes=result.slopes)
        values = values[:FALLBACK_SAMPLES]
        note = "the linear model failed its check, so full runs of fewer samples"
    else:
        note = ""
    found = read_all(read, list(_boards(board, parts, values)), workers)
    readings = [r for r in found if r is not None]
    failed = len(found) - len(readings)
    if failed * 2 > len(found):
        raise EngineError(f"the simulation failed for {failed} of {len(found)} sampled boards",
                          "try the other engine")
    if failed:
        note = "; ".join(filter(None, (note, f"{failed} sampled boards failed to simulate and are left out")))
    band = band_from_readings(readings, probes, accuracy, seed, quantiles, names)
    return replace(band, method="full", runs=len(found), note=note)


def _tolerant(reader: Reader) -> Callable[[Board], Reading | None]:
    """The reader, giving None for a sampled board whose simulation fails."""

    def read(board: Board) -> Reading | None:
        try:
            return reader(board)
        except EngineError:
            return None

    return read


def relative_width(band: Band) -> float:
    """``(high - low) / median`` of a band with values (nan otherwise)."""
    if band.low is None or band.high is None or not band.median:
        return math.nan
    return (band.high - band.low) / band.median
