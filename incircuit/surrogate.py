"""A checked first-order stand-in for identification runs on slow boards.

On a board whose probed piece holds junctions (diodes, transistors, chip
pins), one identification run costs a tenth of a second or more, so 500
runs per band would take minutes. There the Monte Carlo runs on a
log-linear model of the reading instead:

``ln r(f) = ln r0 + sum_i s_i ln f_i``

with ``r0`` the nominal reading and ``s_i`` the secant slope of each part
over its tolerance, ``s_i = ln(r_i / r0) / ln(1 + plus_i)`` (one run with
that part alone at its upper limit; its lower limit when ``plus`` is 0).
That is first-order propagation (JCGM 100:2008, 5.1.2) carried through the
same sampling, so the band keeps its percentiles, median and spread.

The model is checked, never trusted: :data:`CHECK_RUNS` of the sampled
boards are also run in full, and :func:`linear_readings` gives up (returns
None, and the caller runs the full Monte Carlo) when any run reads another
kind than the nominal one, or when the largest difference between model
and full run exceeds :data:`CHECK_FRACTION` of the band's log half-width
and :data:`CHECK_FLOOR`. Cost: ``len(parts) + 1 + CHECK_RUNS`` runs.

>>> from incircuit.model import Board, Part, Reading, Tolerance
>>> t = Tolerance.symmetric(0.05)
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 1e3, tolerance=t), Part("R2", "R", ("A", "B"), 1e3, tolerance=t)))
>>> read = lambda board: Reading("resistor", 1 / sum(1 / p.value for p in board.parts))
>>> import numpy as np
>>> f = np.array([[1.05, 1.05], [0.95, 0.95]])
>>> out = linear_readings(read, b, b.parts, f)
>>> [round(r.value, 1) for r in out.readings]  # exact: 525 and 475; secant slopes
[524.7, 475.3]
>>> out.check_error < CHECK_FLOOR
True
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Callable, Mapping, Sequence

import numpy as np

from .model import Board, Part, Reading
from .workers import read_all

__all__ = ["LinearResult", "linear_readings", "needs_surrogate", "CHECK_RUNS", "CHECK_FRACTION",
           "CHECK_FLOOR", "JUNCTION_KINDS"]

#: Sampled boards also run in full to check the model.
CHECK_RUNS = 8
#: Largest allowed model error as a share of the band's log half-width ...
CHECK_FRACTION = 0.25
#: ... unless it is below this absolute log error (0.5 %: under the
#: tester's own accuracy, so it cannot matter).
CHECK_FLOOR = 0.005
#: Part kinds whose presence makes identification runs slow (junctions).
JUNCTION_KINDS = ("D", "Q", "M", "J", "X")


@dataclass(frozen=True)
class LinearResult:
    """Readings of every sampled board by the model, the slopes, the
    largest check error (log units) and the number of full runs made."""

    readings: list[Reading]
    slopes: Mapping[str, float]
    check_error: float
    runs: int


def needs_surrogate(parts_in_piece: Sequence[Part]) -> bool:
    """Whether the probed piece of the board holds a junction."""
    return any(p.kind in JUNCTION_KINDS for p in parts_in_piece)


def _with_values(board: Board, changes: Mapping[str, float]) -> Board:
    parts = tuple(p.with_value(changes[p.name]) if p.name in changes else p for p in board.parts)
    return replace(board, parts=parts)


def linear_readings(reader: Callable[[Board], Reading | None], board: Board, parts: Sequence[Part],
                    factors: np.ndarray, workers: int = 1,
                    quantiles: tuple[float, float] = (0.005, 0.995)) -> LinearResult | None:
    """Readings of the boards ``board`` with ``parts`` scaled by each row of
    ``factors``, from the checked log-linear model; None when the check fails."""
    steps = []
    for p in parts:
        tol = p.tolerance
        up = tol.plus if tol and tol.plus > 0 else -(tol.minus if tol else 0.0)
        steps.append(1.0 + up)
    boards = [board]
    boards += [_with_values(board, {p.name: float(p.value) * s}) for p, s in zip(parts, steps)]  # type: ignore[arg-type]
    check = factors[:CHECK_RUNS]
    boards += [_with_values(board, {p.name: float(p.value) * f for p, f in zip(parts, row)})  # type: ignore[arg-type]
               for row in check]
    found = read_all(reader, boards, workers)
    if any(r is None for r in found):  # a run failed: leave it to the full runs
        return None
    runs: list[Reading] = found  # type: ignore[assignment]
    nominal = runs[0]
    if any(r.kind != nominal.kind for r in runs):
        return None
    if nominal.value is None:
        return LinearResult([nominal] * len(factors), {p.name: 0.0 for p in parts}, 0.0, len(runs))
    if any(r.value is None or not r.value > 0 for r in runs):
        return None
    ln0 = math.log(nominal.value)
    slopes = np.array([(math.log(r.value) - ln0) / math.log(s)  # type: ignore[arg-type]
                       for r, s in zip(runs[1:1 + len(parts)], steps)])
    logs = ln0 + np.log(factors) @ slopes if len(parts) else np.full(len(factors), ln0)
    checked = runs[1 + len(parts):]
    errors = [abs(math.log(r.value) - logs[i]) for i, r in enumerate(checked)]  # type: ignore[arg-type]
    worst = float(max(errors, default=0.0))
    half = 0.5 * float(np.quantile(logs, quantiles[1]) - np.quantile(logs, quantiles[0]))
    if worst > max(CHECK_FRACTION * half, CHECK_FLOOR):
        return None
    readings = [Reading(nominal.kind, float(math.exp(x)), nominal.unit, nominal.extra) for x in logs]
    return LinearResult(readings, {p.name: float(s) for p, s in zip(parts, slopes)}, worst, len(runs))
