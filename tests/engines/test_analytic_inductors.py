"""Analytic engine with inductors and couplings: textbook RL and coupled-coil formulas."""

from __future__ import annotations

import math

import numpy as np
import pytest

from incircuit.engines import get_engine, solve
from incircuit.engines.base import Source, Watch
from incircuit.model import Board, Part

ENGINE = get_engine("analytic")
RD = 1e-3  # drive resistance of the near-ideal low side (ohm)
LOW = Source(RD, 0.0)


def test_rl_current_rise():
    # RL rise i(t) = V/R (1 - exp(-t R / L)), Horowitz & Hill 3rd ed. ch. 1
    r, h = 680.0, 10e-3
    b = Board("t", (Part("L1", "L", ("A", "B"), h),))
    s = ENGINE.open(b, ("A", "B"), 0.0)
    times = np.array([1e-6, 10e-6, 50e-6])
    res = s.run((Source(r, 5.0), LOW), 100e-6, sample_times=times)
    rt = r + RD
    current = (5.0 - res.samples[:, 0]) / r
    # closed form is exact; GMIN (1e-12 S) against 680 ohm perturbs by ~1e-9
    np.testing.assert_allclose(current, 5.0 / rt * (1 - np.exp(-times * rt / h)), rtol=1e-7)
    # time for the current to reach half its final value: (L/R) ln 2
    s = ENGINE.open(b, ("A", "B"), 0.0)
    res = s.run((Source(r, 5.0), LOW), 1e-3, watch=Watch(0, 5.0 - r * 2.5 / rt, rising=False))
    assert res.crossed
    assert res.duration == pytest.approx(h / rt * math.log(2.0), rel=1e-7)


def test_inductor_current_carries_over_and_dcr():
    # L with series DCR: final current V/(R + DCR) (Ohm's law); after release the
    # probe stray and the coil ring, but energy stays bounded by L i^2 / 2.
    b = Board("t", (Part("L1", "L", ("A", "B"), 1e-3, params={"dcr": 2.0}),))
    s = ENGINE.open(b, ("A", "B"), 0.0)
    res = s.run((Source(98.0, 5.0), LOW), 0.01)  # 100 L/R
    assert res.volts[0] - res.volts[1] == pytest.approx(5.0 * 2.0 / (100.0 + RD), rel=1e-7)


def test_coupled_coils_shorted_secondary():
    # A shorted secondary leaves L1 (1 - k^2) (coupled inductors, Alexander &
    # Sadiku, Fundamentals of Electric Circuits, ch. 13): the RL time constant shrinks.
    r, l1, l2, k = 100.0, 1e-3, 4e-3, 0.9
    parts = (
        Part("L1", "L", ("A", "B"), l1),
        Part("L2", "L", ("S", "T"), l2),
        Part("K1", "K", (), k, params={"inductors": ("L1", "L2")}),
    )
    shorted = Board("t", parts + (Part("R0", "R", ("S", "T"), 0.0),))
    s = ENGINE.open(shorted, ("A", "B"), 0.0)
    rt = r + RD
    res = s.run((Source(r, 5.0), LOW), 1.0, watch=Watch(0, 2.5, minus=1, rising=False))
    assert res.duration == pytest.approx(l1 * (1 - k * k) / rt * math.log(2.0), rel=1e-6)
    # open secondary: plain L1
    s = ENGINE.open(Board("t", parts), ("A", "B"), 0.0)
    res = s.run((Source(r, 5.0), LOW), 1.0, watch=Watch(0, 2.5, minus=1, rising=False))
    assert res.duration == pytest.approx(l1 / rt * math.log(2.0), rel=1e-6)


def test_parallel_rlc_ringing():
    # Parallel RLC driven by a current step I: v(t) = I/(wd C) e^(-a t) sin(wd t),
    # a = 1/(2RC), wd = sqrt(1/(LC) - a^2) (underdamped step response, Alexander &
    # Sadiku, Fundamentals of Electric Circuits, ch. 8): first zero at pi / wd.
    h, c, r = 1e-3, 1e-9, 100e3
    b = Board("t", (Part("L1", "L", ("A", "B"), h), Part("C1", "C", ("A", "B"), c)))
    s = ENGINE.open(b, ("A", "B"), 0.0)
    rt = r + RD
    a = 1.0 / (2 * rt * c)
    wd = math.sqrt(1.0 / (h * c) - a * a)
    times = np.array([0.5e-6, 1.0e-6, 2.0e-6])
    res = s.run((Source(r, 5.0), LOW), 1e-3, watch=Watch(0, -1e-9, minus=1, rising=False), sample_times=times)
    # the watch level 1 nV below zero delays the crossing by ~2e-14 s
    assert res.duration == pytest.approx(math.pi / wd, rel=1e-6)
    v = 5.0 / rt / (wd * c) * np.exp(-a * times) * np.sin(wd * times)
    np.testing.assert_allclose(res.samples[:, 0] - res.samples[:, 1], v, rtol=1e-6)


def test_expm_fallback_agrees_with_modal(monkeypatch):
    # The matrix exponential (scipy.linalg.expm) and the eigen-decomposition must
    # give the same waveform. The system is stiff (20 pF stray through 22 ohm
    # against 200 us, |F t| ~ 1e5), where expm's scaling and squaring loses a
    # few digits (observed ~2e-9 relative), hence rtol 1e-7.
    parts = (
        Part("R1", "R", ("A", "X"), 330.0),
        Part("L1", "L", ("X", "Y"), 2e-3, params={"dcr": 1.5}),
        Part("C1", "C", ("Y", "B"), 220e-9),
        Part("R2", "R", ("Y", "B"), 10e3),
    )
    b = Board("t", parts)
    times = np.linspace(0, 200e-6, 7)

    def trace():
        s = ENGINE.open(b, ("A", "B"), 20e-12)
        r1 = s.run((Source(22.0, 5.0), LOW), 200e-6, sample_times=times)
        r2 = s.run((None, LOW), 100e-6, watch=Watch(0, 0.5, rising=False))
        return r1.samples, r2.duration, r2.crossed

    modal = trace()
    monkeypatch.setattr(solve, "EIG_COND_MAX", 0.0)
    fallback = trace()
    np.testing.assert_allclose(fallback[0], modal[0], rtol=1e-7, atol=1e-12)
    assert fallback[2] == modal[2]
    assert fallback[1] == pytest.approx(modal[1], rel=1e-7)
