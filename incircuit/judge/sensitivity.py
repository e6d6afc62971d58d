"""Sensitivity: how strongly the in-circuit reading follows the part.

``S = (dReading/Reading) / (dValue/Value)`` by a symmetric difference:

* R, C, L: the value times ``1 + d`` and ``1 - d``;
  ``S = (r+ - r-) / r0 / (2 d)``, with ``d`` from :func:`value_step`.
* D, Q, M, J: the model parameter of ``SEMICONDUCTOR_PARAMETER`` (a
  diode's saturation current, a transistor's forward gain, a FET's
  threshold or pinch-off voltage) times and divided by a factor; the change of the
  in-circuit reading is referred to the change of the isolated reading,
  ``S = ((i+ - i-)/i0) / ((a+ - a-)/a0)``, since such a part's "value" is
  what it reads alone.

When one perturbed reading changes kind, the other side alone gives a
one-sided difference; when both do, or the reading has no value, S is None.

>>> from incircuit.model import Reading
>>> R = lambda v: Reading("resistor", v)
>>> round(ratio(R(5000.0), R(5150.0), R(4850.0), 0.2), 3)   # 300/5000 over 20 %
0.3
>>> from incircuit.model import Part, Tolerance
>>> value_step(Part("C1", "C", ("A", "B"), 1e-6, tolerance=Tolerance.symmetric(0.2)))
0.2
>>> value_step(Part("R1", "R", ("A", "B"), 1e3, tolerance=Tolerance.symmetric(0.01)))
0.1
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

from ..model import Board, Part, Reading
from .band import part_tolerance
from .runs import Runs, with_model_param
from .thresholds import PERTURBATION, SEMICONDUCTOR_PARAMETER, TOLERANCE_STEP_RANGE

__all__ = ["Sensitivity", "sensitivity", "one_sided", "ratio", "perturbed_boards", "value_step"]


def value_step(part: Part) -> float:
    """Relative step of an R, C or L for the symmetric difference: its
    tolerance when symmetric and within ``TOLERANCE_STEP_RANGE``, else
    ``PERTURBATION``."""
    minus, plus, _ = part_tolerance(part)
    lo, hi = TOLERANCE_STEP_RANGE
    return minus if minus == plus and lo <= minus <= hi else PERTURBATION


@dataclass(frozen=True)
class Sensitivity:
    """The sensitivity and the readings it rests on."""

    value: float | None
    #: What was changed: "value" or a model parameter name.
    what: str
    #: Relative step of the part (for R/C/L) or of its isolated reading.
    step: float
    plus: Reading | None = None
    minus: Reading | None = None

    def to_dict(self) -> dict:
        return {"value": self.value, "changed": self.what, "step": self.step,
                "plus": self.plus.to_dict() if self.plus else None,
                "minus": self.minus.to_dict() if self.minus else None}


def ratio(base: Reading, plus: Reading | None, minus: Reading | None, span: float) -> float | None:
    """Relative change of the reading per relative change ``span`` (the
    distance between the two perturbed points), one-sided when a side
    changed kind."""
    if base.value in (None, 0.0) or span == 0:
        return None
    ok = [r is not None and r.kind == base.kind and r.value is not None for r in (plus, minus)]
    if all(ok):
        return (plus.value - minus.value) / base.value / span  # type: ignore[union-attr,operator]
    if ok[0]:
        return (plus.value - base.value) / base.value / (span / 2)  # type: ignore[union-attr,operator]
    if ok[1]:
        return (base.value - minus.value) / base.value / (span / 2)  # type: ignore[union-attr,operator]
    return None


def perturbed_boards(board: Board, part: str, up: bool) -> tuple[Board, str, float]:
    """The board with the part nudged up or down; what was changed and the
    factor applied."""
    p = board.part(part)
    if p.kind in ("R", "C", "L") and p.value:
        step = value_step(p)
        factor = 1.0 + step if up else 1.0 - step
        return board.with_part(p.with_value(p.value * factor)), "value", factor
    if p.kind in SEMICONDUCTOR_PARAMETER:
        key, default, step = SEMICONDUCTOR_PARAMETER[p.kind]
        model = board.models.get(p.model or "")
        base = float(model.params.get(key, default)) if model is not None else default
        if base == 0.0:
            raise ValueError(f"{p.name}: {key} is zero, nothing to scale")
        factor = step if up else 1.0 / step
        return with_model_param(board, p.name, key, base * factor), key, factor
    raise ValueError(f"{p.name}: nothing to perturb")


def sensitivity(runs: Runs, board: Board, part: str, probes: Sequence[str], base: Reading,
                iso: Reading | None = None) -> Sensitivity:
    """The part's sensitivity on ``probes`` (``base``: the in-circuit reading)."""
    p = board.part(part)
    try:
        up, what, _ = perturbed_boards(board, p.name, True)
        down, _, _ = perturbed_boards(board, p.name, False)
    except ValueError:
        what = SEMICONDUCTOR_PARAMETER[p.kind][0] if p.kind in SEMICONDUCTOR_PARAMETER else "value"
        return Sensitivity(None, what, 0.0)
    plus, minus = runs.try_reading(up, probes), runs.try_reading(down, probes)
    if what == "value":
        step = value_step(p)
        return Sensitivity(ratio(base, plus, minus, 2 * step), what, step, plus, minus)
    # a semiconductor: refer the in-circuit change to the isolated change, the
    # part alone probed on the same nets (or on its own pins if a probe is elsewhere)
    own = _own_probes(p, probes)
    iso = iso if iso is not None else runs.isolated(board, p.name, own)
    if iso is None:
        return Sensitivity(None, what, 0.0, plus, minus)
    iso_plus = runs.isolated(up, p.name, own)
    iso_minus = runs.isolated(down, p.name, own)
    iso_span = ratio(iso, iso_plus, iso_minus, 1.0)
    in_span = ratio(base, plus, minus, 1.0)
    if iso_span in (None, 0.0) or in_span is None:
        return Sensitivity(None, what, 0.0, plus, minus)
    return Sensitivity(in_span / iso_span, what, abs(iso_span) / 2, plus, minus)


def _own_probes(p: Part, probes: Sequence[str]) -> tuple[str, ...]:
    return tuple(probes) if all(n in p.pins for n in probes) else tuple(p.pins[:len(probes)])


def one_sided(runs: Runs, board: Board, part: str, probes: Sequence[str], base: Reading) -> float | None:
    """S from the upward step alone (one run more; for a semiconductor two,
    the isolated one being cheap): used for lift candidates."""
    p = board.part(part)
    try:
        up, what, factor = perturbed_boards(board, p.name, True)
    except ValueError:
        return None
    plus = runs.try_reading(up, probes)
    if what == "value":
        return ratio(base, plus, None, 2 * (factor - 1.0))
    own = _own_probes(p, probes)
    iso, iso_plus = runs.isolated(board, p.name, own), runs.isolated(up, p.name, own)
    if iso is None:
        return None
    in_span, iso_span = ratio(base, plus, None, 2.0), ratio(iso, iso_plus, None, 2.0)
    return None if not iso_span or in_span is None else in_span / iso_span
