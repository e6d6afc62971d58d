"""Likelihood and fitting of fault amounts, with closed-form readers."""

import math

import pytest

from incircuit.hypotheses import FIT_RANGES, Hypothesis, fit, hypotheses_for
from incircuit.likelihood import (KIND_FLOOR, LOG_SPAN, OUTLIER, Prediction, combine_sigma,
                                  log_likelihood)
from incircuit.model import Board, Part, Reading


def test_value_term_is_a_gaussian_on_the_log():
    # Normal density on ln v, exp(-z^2/2) / (sigma sqrt(2 pi)) (NIST/SEMATECH
    # e-Handbook of Statistical Methods 1.3.6.6.1), mixed with the flat term.
    p = Prediction("resistor", 1000.0, sigma=0.1)
    for factor in (1.0, 1.1, 0.8):
        z = math.log(factor) / 0.1
        density = math.exp(-0.5 * z * z) / (0.1 * math.sqrt(2 * math.pi))
        expected = math.log((1 - OUTLIER) * density + OUTLIER / LOG_SPAN)
        got = log_likelihood(Reading("resistor", 1000.0 * factor), p)
        assert got == pytest.approx(expected, rel=1e-12)  # same formula, rounding only


def test_far_readings_and_other_kinds_fall_to_the_floors():
    p = Prediction("capacitor", 1e-6, sigma=0.05)
    far = log_likelihood(Reading("capacitor", 1e-3), p)
    assert far == pytest.approx(math.log(OUTLIER / LOG_SPAN), rel=1e-6)  # exp(-z^2/2) underflows
    other = log_likelihood(Reading("resistor", 50.0), p)
    assert other == pytest.approx(math.log(KIND_FLOOR) + math.log(OUTLIER / LOG_SPAN), rel=1e-9)
    nothing = log_likelihood(Reading("nothing"), Prediction("nothing", None, kinds={"nothing": 0.3}))
    assert nothing == pytest.approx(math.log(0.3), rel=1e-12)


def test_combine_sigma_is_root_sum_of_squares():
    assert combine_sigma(0.03, 0.04, None) == pytest.approx(0.05, rel=1e-12)  # 3-4-5


def test_hypotheses_have_priors_healthy_favoured():
    b = Board("t", (Part("C1", "C", ("A", "B"), 1e-6), Part("R1", "R", ("A", "B"), 1e3)))
    hs = hypotheses_for(b, ["C1", "R1"])
    assert hs[0].part is None and hs[0].prior == 2.0
    for name in ("C1", "R1"):
        assert sum(h.prior for h in hs if h.part == name) == pytest.approx(1.0, rel=1e-12)
    assert [h.fault for h in hs if h.part == "R1"] == ["open", "short", "drift"]


def _parallel_caps_objective(reading, sigma=0.05):
    # Parallel capacitances add (Horowitz & Hill 3rd ed. 1.4.1): C1 * f + C2.
    c1, c2 = 10e-6, 100e-9

    def objective(u):
        v = c1 * math.exp(u) + c2
        ll = log_likelihood(Reading("capacitor", reading), Prediction("capacitor", v, sigma=sigma))
        return ll, [(math.log(v), sigma)]

    return objective


def test_fit_recovers_the_drift_factor():
    # reading 4.1 uF = 10 uF * 0.4 + 0.1 uF: the factor is 0.4 exactly.
    f = fit(_parallel_caps_objective(4.1e-6), "drift", targets=[math.log(4.1e-6)])
    assert f.amount == pytest.approx(0.4, rel=6e-3)  # Brent XATOL 0.005 on ln(factor)
    # The Occam factor: marginal = peak * sqrt(2 pi) * s_u / W with s_u =
    # sigma / S, S = d ln v / d ln f = 4.0 / 4.1 at the fit (MacKay 2003 ch. 28).
    s = 0.05 / (4.0 / 4.1)
    width = math.log(FIT_RANGES["drift"][1] / FIT_RANGES["drift"][0])
    expected = f.log_peak + math.log(math.sqrt(2 * math.pi) * s / width)
    assert f.log_marginal == pytest.approx(expected, abs=0.02)  # finite-difference slope


def test_hypothesis_labels_and_values():
    h = Hypothesis("C1", "drift", 0.41, 10e-6, "F")
    assert h.label() == "C1 at 41 % of nominal (4.1 uF)"
    assert h.value == pytest.approx(4.1e-6, rel=1e-12)
    b = Board("t", (Part("C1", "C", ("A", "B"), 10e-6),))
    assert h.apply(b).part("C1").value == pytest.approx(4.1e-6, rel=1e-12)
    assert Hypothesis("C1", "leakage", 2200.0).label() == "C1 leaky: 2.2 kohm in parallel"


def test_fit_skips_refining_when_no_cell_can_explain_the_reading():
    # 5e3 F is far above C1 * f + C2 for every f in the range (at most 1 mF):
    # no grid cell brackets it, so no refinement, and the nearest end is kept.
    f = fit(_parallel_caps_objective(5e3), "drift", targets=[math.log(5e3)])
    assert not f.refined
    assert f.amount == pytest.approx(FIT_RANGES["drift"][1], rel=1e-9)  # the nearest end


def test_esr_term_is_a_gaussian_on_the_value():
    # ESR compared on a linear scale (a good capacitor reads 0 ohm); normal
    # density as above, sigma = max(step, 30 % of the prediction).
    from incircuit.likelihood import ESR_SPAN
    p = Prediction("capacitor", 1e-4, sigma=0.05, esr=0.0, esr_sigma=0.31)
    base = log_likelihood(Reading("capacitor", 1e-4), p)
    with_esr = log_likelihood(Reading("capacitor", 1e-4, extra={"esr": 2.3}), p)
    z = 2.3 / 0.31
    density = math.exp(-0.5 * z * z) / (0.31 * math.sqrt(2 * math.pi))
    expected = math.log((1 - OUTLIER) * density + OUTLIER / ESR_SPAN)
    assert with_esr - base == pytest.approx(expected, rel=1e-9)  # same formula, rounding only
