"""Fault hypotheses for a diagnosis, and fitting their free amount.

A hypothesis is "the board is healthy" or one :class:`~incircuit.faults.Fault`
of the diagnosed part or of a neighbour on its paths. ``open`` and
``short`` have no free amount; ``drift`` (value times a factor),
``leakage`` (a parallel resistance) and ``esr`` (a capacitor's series
resistance) are fitted to the readings by bounded minimisation of the
negative log-likelihood over the log of the amount: a coarse grid of
:data:`GRID_POINTS`, then Brent's method within the best grid cell that
can explain the readings (each reading between the cell's two predictions
or within :data:`Z_NEAR` sigma of one); a hypothesis with no such cell is
scored from the grid alone.

A fitted hypothesis is scored by its marginal likelihood, with a
log-uniform prior over :data:`FIT_RANGES`: ``L(amount*) * sqrt(2 pi) *
s_u / W`` (Laplace's approximation; ``W`` the width of the range in log
units, ``s_u`` the log-amount spread that the readings allow, from the
sensitivity ``d ln(reading) / d ln(amount)``). A free amount can explain
many readings; this factor charges it for that (MacKay, *Information
Theory, Inference, and Learning Algorithms*, 2003, ch. 28, "Occam
factor"). Where the readings do not pin the amount down, the grid average
of the likelihood is used instead (the larger of the two is kept).

Prior weights: a healthy board :data:`HEALTHY_WEIGHT`, every part 1,
shared equally among that part's faults.

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("C1", "C", ("A", "B"), 1e-6),))
>>> [h.label() for h in hypotheses_for(b, ["C1"])]
['healthy board', 'C1 open', 'C1 shorted', 'C1 drifted', 'C1 leaky']
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, Sequence

import numpy as np
from scipy.optimize import minimize_scalar

from .faults import Fault, apply_fault
from .model import Board, Part
from .units import format_value

__all__ = [
    "Hypothesis",
    "Fit",
    "hypotheses_for",
    "fit",
    "fault_kinds",
    "FIT_RANGES",
    "HEALTHY_WEIGHT",
    "GRID_POINTS",
    "XATOL",
    "Z_NEAR",
]

#: Fitted fault -> (lowest, highest) amount: a factor for drift, ohms for
#: leakage and esr. Below 10 ohm a leak is a short; above 10 Mohm the
#: tester's 470 kohm resistor cannot see it.
FIT_RANGES = {"drift": (0.01, 100.0), "leakage": (10.0, 10e6), "esr": (0.01, 100.0)}

#: Prior weight of a healthy board against 1 for each part.
HEALTHY_WEIGHT = 2.0

#: Points of the coarse grid over the log of a fitted amount.
GRID_POINTS = 7

#: A grid cell is refined only if each reading lies between its two
#: predictions or within this many standard deviations of one of them.
Z_NEAR = 4.0

#: Precision of the fitted log-amount (0.5 %: finer than a reading can tell).
XATOL = 0.005

_UNITS = {"R": "ohm", "C": "F", "L": "H"}


def fault_kinds(part: Part, with_esr: bool = False) -> tuple[str, ...]:
    """The faults considered for ``part``: open, short, fitted drift of a
    value, fitted leakage of a capacitor or junction, fitted ESR of a
    capacitor when a reading shows one. An unmodelled chip: open only."""
    if part.kind == "X":
        return ("open",)
    if part.kind == "K":
        return ()
    kinds = ["open", "short"]
    if part.kind in ("R", "C", "L") and part.value:
        kinds.append("drift")
    if part.kind in ("C", "D"):
        kinds.append("leakage")
    if part.kind == "C" and with_esr:
        kinds.append("esr")
    return tuple(kinds)


@dataclass(frozen=True)
class Hypothesis:
    """Healthy (``part`` None) or ``fault`` of ``part``, with the fitted
    ``amount`` (factor for drift, ohms for leakage/esr) once known."""

    part: str | None
    fault: str = "healthy"
    amount: float | None = None
    nominal: float | None = None
    unit: str | None = None
    prior: float = 1.0

    @property
    def fitted(self) -> bool:
        return self.fault in FIT_RANGES

    def with_amount(self, amount: float) -> "Hypothesis":
        return Hypothesis(self.part, self.fault, amount, self.nominal, self.unit, self.prior)

    def apply(self, board: Board, amount: float | None = None) -> Board:
        """The board as this hypothesis has it."""
        if self.part is None:
            return board
        amount = self.amount if amount is None else amount
        return apply_fault(board, Fault(self.part, self.fault, amount))

    @property
    def value(self) -> float | None:
        """The fitted value in SI units: the part's value for drift, ohms otherwise."""
        if self.amount is None:
            return None
        if self.fault == "drift" and self.nominal is not None:
            return self.nominal * self.amount
        return self.amount

    def label(self) -> str:
        if self.part is None:
            return "healthy board"
        if self.amount is None:
            words = {"open": "open", "short": "shorted", "drift": "drifted", "leakage": "leaky",
                     "esr": "with high ESR"}
            return f"{self.part} {words[self.fault]}"
        if self.fault == "drift":
            text = f"{self.part} at {self.amount * 100:.0f} % of nominal"
            if self.nominal is not None:
                text += f" ({format_value(self.nominal * self.amount, self.unit)})"
            return text
        if self.fault == "leakage":
            return f"{self.part} leaky: {format_value(self.amount, 'ohm')} in parallel"
        return f"{self.part} with ESR {format_value(self.amount, 'ohm')}"


def hypotheses_for(board: Board, parts: Sequence[str], with_esr: bool = False) -> list[Hypothesis]:
    """Healthy first, then every fault of every named part, with priors."""
    out = [Hypothesis(None, prior=HEALTHY_WEIGHT)]
    for name in parts:
        part = board.part(name)
        kinds = fault_kinds(part, with_esr)
        for kind in kinds:
            out.append(Hypothesis(part.name, kind, None, part.value, _UNITS.get(part.kind),
                                  1.0 / len(kinds)))
    return out


@dataclass(frozen=True)
class Fit:
    """The best amount, the log-likelihood there and the log marginal
    likelihood (with the Occam factor) of a fitted hypothesis."""

    amount: float
    log_peak: float
    log_marginal: float
    #: False when the coarse grid showed no cell could explain the readings.
    refined: bool = True


#: Objective: log-amount -> (total log-likelihood, per-reading (ln value,
#: sigma) for the sensitivity, or None when a reading has no value or the
#: kind differs from the reading's).
Objective = Callable[[float], tuple[float, list[tuple[float, float] | None]]]


def _distance(info: list, targets: Sequence[float | None] | None) -> float:
    """Sum of squared z of the predictions from the readings (inf: no value)."""
    if not targets:
        return 0.0
    total = 0.0
    for i, t in enumerate(targets):
        if t is not None:
            if not info or info[i] is None:
                return math.inf
            total += ((info[i][0] - t) / info[i][1]) ** 2
    return total


def _promising(a: list, b: list, targets: Sequence[float | None]) -> bool:
    """Whether the cell between two grid points can hold the best fit: every
    reading lies between the cell's two predictions or within Z_NEAR of one."""
    for i, t in enumerate(targets):
        if t is None:
            continue
        ends = [(e[i][0] - t) / e[i][1] for e in (a, b) if e and e[i] is not None]
        if not ends:
            return False
        if not (min(ends) <= 0 <= max(ends) or min(abs(z) for z in ends) < Z_NEAR):
            return False
    return True


def fit(objective: Objective, fault: str, targets: Sequence[float | None] | None = None,
        step: float = 0.05) -> Fit:
    """Maximise ``objective`` over ``ln(amount)`` within ``FIT_RANGES[fault]``.

    ``targets`` (the log of each reading's value, None for a reading without
    one) lets the coarse grid rule out cells that cannot explain the
    readings; only a promising cell is refined (all are, without targets).
    """
    lo, hi = (math.log(x) for x in FIT_RANGES[fault])
    width = hi - lo
    grid = np.linspace(lo, hi, GRID_POINTS)
    cache: dict[float, tuple[float, list]] = {}

    def evaluate(u: float) -> tuple[float, list]:
        key = round(float(u), 9)
        if key not in cache:
            cache[key] = objective(float(u))
        return cache[key]

    evals = [evaluate(u) for u in grid]
    values = np.array([e[0] for e in evals])
    # the best grid point; among equals (all on the flat floor far from the
    # readings) the one whose predictions come nearest
    best = max(range(len(grid)), key=lambda k: (round(float(values[k]), 9), -_distance(evals[k][1], targets)))
    # grid average of the likelihood: the marginal when the readings do not
    # pin the amount down (trapezoid rule on a uniform prior)
    shifted = np.exp(values - values.max())
    log_grid = float(values.max() + math.log(np.trapezoid(shifted, grid) / width))

    if targets is None:
        cells = [(max(best - 1, 0), min(best + 1, len(grid) - 1))]
    else:
        cells = [(k, k + 1) for k in range(len(grid) - 1)
                 if any(t is not None for t in targets) and _promising(evals[k][1], evals[k + 1][1], targets)]
        cells.sort(key=lambda c: -max(values[c[0]], values[c[1]]))
    if not cells:
        return Fit(math.exp(grid[best]), float(values[best]), log_grid, refined=False)
    a, b = grid[cells[0][0]], grid[cells[0][1]]
    result = minimize_scalar(lambda u: -evaluate(u)[0], bounds=(a, b), method="bounded",
                             options={"xatol": XATOL})
    u_best = float(result.x) if -result.fun > values[best] else float(grid[best])
    log_peak = evaluate(u_best)[0]

    # Laplace: spread of ln(amount) allowed by the readings, from the
    # sensitivity of each reading's log-value (Gauss-Newton curvature)
    log_laplace = -math.inf
    u1, u2 = max(u_best - step, lo), min(u_best + step, hi)
    here = evaluate(u_best)[1]
    left, right = evaluate(u1)[1], evaluate(u2)[1]
    if here and all(x is not None for x in here + left + right) and u2 > u1:
        info = sum(((r[0] - l[0]) / (u2 - u1)) ** 2 / h[1] ** 2
                   for h, l, r in zip(here, left, right))
        spread = math.sqrt(2.0 * math.pi / info) if info > 0 else width
        log_laplace = log_peak + math.log(min(spread, width) / width)
    return Fit(math.exp(u_best), log_peak, max(log_laplace, log_grid))
