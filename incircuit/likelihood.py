"""How well a predicted reading explains the reading a technician got.

One documented likelihood, used for every hypothesis (healthy or faulty):

``L(r | h) = P_h(kind of r) * [(1 - OUTLIER) * N(ln v_r; mu_h, sigma_h) + OUTLIER / LOG_SPAN]``

* ``P_h(kind)`` is the share of the hypothesis' readings of that kind (the
  Monte Carlo ``kind_fraction`` for a healthy board; 1 or 0 for the single
  prediction of a fault), never below ``KIND_FLOOR`` (a tester sometimes
  names the kind wrongly near a decision threshold).
* The value term is a Gaussian on the natural log of the value: readings
  spread by factors, not by fixed amounts. ``mu_h`` is the log of the
  predicted value (the Monte Carlo log-mean for a healthy board);
  ``sigma_h = sqrt(s_circuit^2 + s_instrument^2 + MODEL_SIGMA^2)``:
  the tolerance spread from the Monte Carlo band, the instrument's
  accuracy (a uniform error within ± accuracy, so ``accuracy / (v sqrt 3)``
  in log terms, JCGM 100:2008 4.3.7), and an allowance for the difference
  between the simulated and the real instrument.
* ``OUTLIER / LOG_SPAN`` is a flat density over twelve decades: a reading
  far off every prediction is not infinitely unlikely (a slipped probe, a
  misread display). It also stands in for the value term when the
  hypothesis predicts another kind or no value.
* A secondary ESR, when both the reading and the prediction have one, adds
  a Gaussian on its value (linear: a good capacitor's ESR reads 0) with
  ``sigma = sqrt((ESR_RELATIVE * esr)^2 + step^2)``, ``step`` the tester's
  ESR resolution, mixed with ``OUTLIER / ESR_SPAN``.

A reading without a value ("nothing") scores ``P_h(kind)`` alone.

>>> from incircuit.model import Reading
>>> p = Prediction("capacitor", 1e-6, sigma=0.05)
>>> good = log_likelihood(Reading("capacitor", 1.0e-6), p)
>>> bad = log_likelihood(Reading("capacitor", 0.5e-6), p)
>>> good > bad
True
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Mapping

from .model import Reading

__all__ = [
    "Prediction",
    "log_likelihood",
    "combine_sigma",
    "KIND_FLOOR",
    "OUTLIER",
    "LOG_SPAN",
    "MODEL_SIGMA",
    "ESR_RELATIVE",
    "ESR_SPAN",
]

#: Least probability given to a reading kind a hypothesis does not predict.
KIND_FLOOR = 0.01
#: Weight of the flat "anything" density beside the Gaussian.
OUTLIER = 0.01
#: Width in natural-log units of the flat density: twelve decades.
LOG_SPAN = math.log(1e12)
#: Relative (log) allowance for the simulated instrument differing from a
#: real one: a project choice, 3 %.
MODEL_SIGMA = 0.03
#: Relative spread of an ESR reading: a project choice, 30 % (ESR from a
#: voltage step over a few ohms is coarse on such instruments, common practice).
ESR_RELATIVE = 0.3
#: Width (ohm) of the flat density beside the ESR Gaussian.
ESR_SPAN = 100.0

_HALF_LOG_2PI = 0.5 * math.log(2.0 * math.pi)


@dataclass(frozen=True)
class Prediction:
    """What one hypothesis predicts for one measurement.

    ``kind``/``value``: the predicted reading (``log_mean`` overrides
    ``ln value`` when given); ``sigma``: total log-spread;
    ``kinds``: share per kind (default: all of ``kind``); ``esr``: the
    predicted ESR (ohm) or None, with its standard deviation ``esr_sigma``.
    """

    kind: str
    value: float | None
    sigma: float = MODEL_SIGMA
    kinds: Mapping[str, float] = field(default_factory=dict)
    log_mean: float | None = None
    esr: float | None = None
    esr_sigma: float | None = None

    def kind_probability(self, kind: str) -> float:
        share = self.kinds.get(kind, 0.0) if self.kinds else float(kind == self.kind)
        return max(share, KIND_FLOOR)

    @property
    def mu(self) -> float | None:
        if self.log_mean is not None:
            return self.log_mean
        if self.value is None or not self.value > 0 or not math.isfinite(self.value):
            return None
        return math.log(self.value)


def combine_sigma(*parts: float | None) -> float:
    """Root sum of squares of the parts given (None counts as zero)."""
    return math.sqrt(sum(float(p) ** 2 for p in parts if p))


def _log_gauss(x: float, mu: float, sigma: float) -> float:
    z = (x - mu) / sigma
    return -0.5 * z * z - math.log(sigma) - _HALF_LOG_2PI


def _log_mix(log_gauss: float, span: float = LOG_SPAN) -> float:
    """ln[(1 - OUTLIER) e^log_gauss + OUTLIER / span], stably."""
    a = math.log1p(-OUTLIER) + log_gauss
    b = math.log(OUTLIER / span)
    hi, lo = max(a, b), min(a, b)
    return hi + math.log1p(math.exp(lo - hi))


def log_likelihood(reading: Reading, predicted: Prediction) -> float:
    """Natural log of ``L(reading | hypothesis)`` (see the module text)."""
    kind_term = math.log(predicted.kind_probability(reading.kind))
    if reading.value is None:
        return kind_term
    if not reading.value > 0:
        raise ValueError("a reading's value must be positive")
    mu = predicted.mu
    if mu is None or reading.kind != predicted.kind:
        return kind_term + math.log(OUTLIER / LOG_SPAN)
    sigma = max(predicted.sigma, 1e-6)
    total = kind_term + _log_mix(_log_gauss(math.log(reading.value), mu, sigma))
    esr = reading.extra.get("esr")
    if esr is not None and predicted.esr is not None:
        sigma_esr = max(predicted.esr_sigma or 0.0, ESR_RELATIVE * predicted.esr, 1e-3)
        total += _log_mix(_log_gauss(float(esr), predicted.esr, sigma_esr), ESR_SPAN)  # type: ignore[arg-type]
    return total
