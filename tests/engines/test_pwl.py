"""Piecewise-linear junction curves against the Shockley diode equation (Sze,
Physics of Semiconductor Devices, the ideal-diode equation I = Is (e^(V/(n Vt)) - 1))."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from incircuit.engines.pwl import (
    VT,
    chord_error,
    current_at,
    diode_curve,
    junction_curve,
    segments,
    shockley_voltage,
    voltage_at,
)

Q2 = math.sqrt(10.0)  # knot current ratio above 1 uA (two knots per decade)


def test_thermal_voltage():
    # Vt = k T / q with the exact SI 2019 constants at 300.15 K: 25.864 mV
    assert VT == pytest.approx(1.380649e-23 * 300.15 / 1.602176634e-19, rel=1e-15)
    assert VT == pytest.approx(0.0258649, abs=5e-8)


def test_chord_error_formula_matches_numerical_maximum():
    # the largest gap between ln(r) and its chord on [1, q], found by scipy's
    # bounded scalar minimiser (tolerance 1e-10 on r)
    for q in (Q2, 10.0, 2.0):
        res = minimize_scalar(
            lambda r: -(math.log(r) - (r - 1) * math.log(q) / (q - 1)),
            bounds=(1.0, q), method="bounded", options={"xatol": 1e-10},
        )
        assert chord_error(q) == pytest.approx(-res.fun, rel=1e-8)


@pytest.mark.parametrize("is_, n, rs", [(1e-14, 1.0, 0.0), (2.5e-9, 1.9, 0.5), (1e-20, 3.5, 20.0), (1e-5, 1.05, 0.1)])
def test_knots_exact_and_chord_error_bound(is_, n, rs):
    curve = junction_curve(is_, n, rs)
    for current in (10e-6, 1e-3):
        # knots: exact but for the GMIN term, GMIN V / slope < 1e-12 S x 4 V / 1e-5 S
        assert voltage_at(curve, current) == pytest.approx(shockley_voltage(current, is_, n, rs), abs=1e-6)
    currents = np.geomspace(1e-6, 1.0, 4001)
    pwl = np.array([voltage_at(curve, c) for c in currents])
    true = np.array([shockley_voltage(c, is_, n, rs) for c in currents])
    err = true - pwl
    bound = chord_error(Q2) * n * VT
    assert err.max() <= bound + 1e-6  # chords lie on the low-voltage side (1e-6: GMIN term)
    assert err.max() >= 0.95 * bound  # and the bound is reached between knots
    assert err.min() >= -1e-6


def test_curve_is_continuous_monotone_and_convex_forward():
    curve = diode_curve({"is": 1e-12, "n": 1.5, "rs": 1.0, "bv": 5.1, "ibv": 1e-3})
    segs = segments(curve)
    for (lo, hi, g, i0), (lo2, _, g2, i02) in zip(segs, segs[1:]):
        assert hi == lo2
        assert g * hi + i0 == pytest.approx(g2 * hi + i02, rel=1e-9, abs=1e-15)  # continuous at knots
        assert g > 0 and g2 > 0
        if hi >= 0:
            assert g2 >= g  # convex on the forward side
    # reverse breakdown passes through (-bv, -ibv): the SPICE diode model's BV/IBV definition
    assert voltage_at(curve, -1e-3) == pytest.approx(-5.1 - 1e-3 * 1.0, abs=1e-9)
    # well below breakdown the leakage stays under 1 nA (> 2 Gohm: invisible
    # through the tester's 470 kohm), though the chord exceeds Is + GMIN V = 3 pA
    assert -1e-9 < current_at(curve, -2.0) < 0


def test_large_saturation_current_keeps_reverse_leakage():
    # a Schottky-like Is = 10 uA leaks -Is in reverse (Shockley: I -> -Is), plus GMIN
    curve = junction_curve(10e-6, 1.05, 0.0)
    assert current_at(curve, -1.0) == pytest.approx(-10e-6 - 1e-12 * 1.0, rel=1e-9)
    assert voltage_at(curve, 1e-3) == pytest.approx(shockley_voltage(1e-3, 10e-6, 1.05), abs=1e-9)


@pytest.mark.parametrize("is_, n", [(1e-14, 1.0), (2.5e-9, 1.75), (10e-6, 1.05), (1e-20, 3.0)])
def test_rest_is_rest_and_no_knot_near_zero(is_, n):
    # a junction at 0 V carries exactly 0 A (a discharged board stays at rest), and
    # no knot lies within 0.05 n Vt of 0 V (junctions near zero bias do not chatter)
    curve = junction_curve(is_, n)
    assert current_at(curve, 0.0) == 0.0
    assert np.min(np.abs(curve.knots_v)) >= 0.05 * n * VT * (1 - 1e-12)
    # reverse current: Is, or a few pA where Is is tiny (Shockley: -Is), plus GMIN
    leak = -current_at(curve, -2.0) - 2e-12
    assert is_ * (1 - 1e-9) <= leak <= max(is_, 1e-11) * (1 + 1e-9)
