"""Analytic engine on linear R and C networks against textbook formulas."""

from __future__ import annotations

import math

import numpy as np
import pytest

from incircuit.engines import get_engine
from incircuit.engines.base import Source, Watch
from incircuit.model import Board, Part

ENGINE = get_engine("analytic")
RD = 1e-3  # drive resistance of the near-ideal sources below (ohm)
HIGH = Source(RD, 5.0)
LOW = Source(RD, 0.0)
# Tolerances: expectations include the drive resistances; the closed form is
# exact up to rounding and GMIN (1e-12 S to the tester's ground from every
# net), which perturbs kilo-ohm networks by ~1e-9 relative, so rtol 1e-7
# leaves margin without hiding real errors.
RTOL = 1e-7


def board(*parts: Part) -> Board:
    return Board("t", parts)


def test_engine_name():
    assert ENGINE.name == "analytic"


def test_rc_charge_waveform():
    # RC charge V(t) = Vs (1 - exp(-t/RC)), Horowitz & Hill 3rd ed. ch. 1
    r, c = 10e3, 1e-6
    s = ENGINE.open(board(Part("R1", "R", ("A", "B"), r), Part("C1", "C", ("B", "G"), c)), ("A", "G"), 0.0)
    times = np.array([0.0, 1e-3, 5e-3, 10e-3, 30e-3])
    res = s.run((HIGH, LOW), 0.05, sample_times=times)
    rc = (r + 2 * RD) * c
    expected_b = 5.0 * (1 - np.exp(-times / rc))
    assert res.samples.shape == (5, 2)
    np.testing.assert_allclose(res.samples[:, 0], 5.0, rtol=RTOL)
    np.testing.assert_allclose(res.nets["B"], 5.0 * (1 - math.exp(-0.05 / rc)), rtol=RTOL)
    s2 = ENGINE.open(
        board(Part("R1", "R", ("A", "B"), r), Part("C1", "C", ("B", "G"), c)), ("A", "B", "G"), 0.0
    )
    res2 = s2.run((HIGH, None, LOW), 0.05, sample_times=times)
    # V(B) - V(G): G sits RD * i above the tester's ground
    np.testing.assert_allclose(res2.samples[:, 1] - res2.samples[:, 2], expected_b, rtol=RTOL, atol=1e-12)


def test_rc_time_to_threshold():
    # t = RC ln(Vs / (Vs - Vth)), Horowitz & Hill 3rd ed. ch. 1
    r, c, vth = 470e3, 100e-9, 3.5
    b = board(Part("C1", "C", ("A", "K"), c))
    s = ENGINE.open(b, ("A", "K"), 0.0)
    res = s.run((Source(r, 5.0), LOW), 1.0, watch=Watch(0, vth, minus=1), sample_times=[0.01, 0.9])
    expected = (r + RD) * c * math.log(5.0 / (5.0 - vth))
    assert res.crossed
    # GMIN (1e-12 S) against 470 kohm shifts the time by ~R*GMIN = 5e-7 relative
    assert res.duration == pytest.approx(expected, rel=2e-6)
    assert res.volts[0] - res.volts[1] == pytest.approx(vth, rel=1e-9)  # root finder rtol 1e-13
    assert not np.isnan(res.samples[0]).any()
    assert np.isnan(res.samples[1]).all()  # after the early stop


def test_watch_falling_and_differential():
    # discharge V(t) = V0 exp(-t/RC), Horowitz & Hill 3rd ed. ch. 1; watch V(A) - V(K)
    r, c = 1e3, 1e-6
    s = ENGINE.open(board(Part("C1", "C", ("A", "K"), c)), ("A", "K"), 0.0)
    s.run((Source(r, 5.0), Source(r, 0.0)), 0.1)  # 50 time constants: charged to 5 V
    res = s.run((Source(r, 0.0), Source(r, 5.0)), 1.0, watch=Watch(0, 0.0, minus=1, rising=False))
    # reversed drive: V(A)-V(K) goes 5 -> -5 through 2 r; crosses 0 at 2rC ln 2
    assert res.crossed
    assert res.duration == pytest.approx(2 * r * c * math.log(2.0), rel=1e-6)


def test_divider_ohms_law():
    # Ohm's law divider: V = Vs R2 / (R1 + R2)
    b = board(Part("R1", "R", ("A", "M"), 1e3), Part("R2", "R", ("M", "B"), 3e3))
    s = ENGINE.open(b, ("A", "B", "M"), 10e-12)
    res = s.run((Source(700.0, 5.0), LOW, None), 1e-3)
    i = 5.0 / (700.0 + 4e3 + RD)
    assert res.volts[0] == pytest.approx(5.0 - 700.0 * i, rel=RTOL)
    assert res.volts[2] == pytest.approx((3e3 + RD) * i, rel=RTOL)
    assert res.nets["M"] - res.nets["B"] == pytest.approx(3e3 * i, rel=RTOL)


def test_series_parallel_combinations():
    # series R add, parallel R combine as product over sum; series C: C1 C2/(C1+C2); parallel C add
    # (Horowitz & Hill 3rd ed. ch. 1)
    b = board(
        Part("R1", "R", ("A", "X"), 1e3),
        Part("R2", "R", ("X", "B"), 2e3),
        Part("R3", "R", ("A", "B"), 6e3),
        Part("C1", "C", ("P", "Q"), 1e-6),
        Part("C2", "C", ("Q", "N"), 3e-6),
        Part("C3", "C", ("P", "N"), 0.25e-6),
    )
    s = ENGINE.open(b, ("A", "B"), 0.0)
    r_eq = 1.0 / (1 / 3e3 + 1 / 6e3)  # 2 kohm
    res = s.run((Source(2e3, 5.0), LOW), 1e-3)
    assert res.volts[0] == pytest.approx(5.0 * (r_eq + RD) / (r_eq + 2e3 + RD), rel=RTOL)
    c_eq = 1e-6 * 3e-6 / 4e-6 + 0.25e-6  # 1 uF
    s = ENGINE.open(b, ("P", "N"), 0.0)
    res = s.run((Source(1e3, 5.0), LOW), 1.0, watch=Watch(0, 2.5, minus=1))
    assert res.duration == pytest.approx((1e3 + RD) * c_eq * math.log(2.0), rel=1e-7)


def test_floating_capacitor_between_unprobed_nets():
    # C2 between two unprobed nets X, Y (a capacitor island with no capacitance
    # to the tester's ground). Thevenin: A-X-Y-B chain of 1k, C2, 1k with probes
    # A, B: the series loop charges C2 with tau = (2k + 2 RD) C2 (Horowitz & Hill ch. 1).
    b = board(
        Part("R1", "R", ("A", "X"), 1e3),
        Part("C2", "C", ("X", "Y"), 1e-6),
        Part("R2", "R", ("Y", "B"), 1e3),
    )
    s = ENGINE.open(b, ("A", "B"), 0.0)
    tau = (2e3 + 2 * RD) * 1e-6
    res = s.run((HIGH, LOW), 1e-3)
    assert res.nets["X"] - res.nets["Y"] == pytest.approx(5.0 * (1 - math.exp(-1e-3 / tau)), rel=RTOL)
    # the island keeps its charge while floating: probes released, X - Y unchanged
    v = res.nets["X"] - res.nets["Y"]
    res = s.run((None, None), 1e-3)
    assert res.nets["X"] - res.nets["Y"] == pytest.approx(v, rel=1e-6)


def test_state_carries_across_steps():
    # charge, float, discharge: V(t) = V0 exp(-t/RC) (Horowitz & Hill 3rd ed. ch. 1)
    r, c = 1e3, 1e-6
    b = board(Part("C1", "C", ("A", "K"), c))
    s = ENGINE.open(b, ("A", "K"), 30e-12)
    s.run((Source(r, 5.0), LOW), 0.02)  # 20 RC
    res = s.run((None, LOW), 0.01)
    # floating: only GMIN and the stray load C1 -> negligible drop
    assert res.volts[0] == pytest.approx(5.0, rel=1e-6)
    res = s.run((Source(r, 0.0), LOW), r * c)
    c_tot = c + 30e-12
    assert res.volts[0] == pytest.approx(5.0 * math.exp(-r * c / ((r + RD) * c_tot)), rel=1e-5)


def test_board_zero_is_an_ordinary_net_and_nets_outside_are_absent():
    b = board(
        Part("R1", "R", ("A", "0"), 1e3),
        Part("R2", "R", ("0", "B"), 1e3),
        Part("R9", "R", ("P", "Q"), 1e3),  # not connected to the probes
    )
    s = ENGINE.open(b, ("A", "B"), 0.0)
    res = s.run((HIGH, None), 1e-3)
    # B floats: the board's net 0 is not the tester's ground
    assert res.volts[1] == pytest.approx(5.0, rel=1e-6)
    assert res.nets["0"] == pytest.approx(5.0, rel=1e-6)
    assert "P" not in res.nets and "Q" not in res.nets


def test_zero_ohm_tie_merges_nets():
    b = board(Part("R1", "R", ("A", "X"), 0.0), Part("R2", "R", ("X", "B"), 1e3))
    s = ENGINE.open(b, ("A", "B"), 0.0)
    res = s.run((Source(1e3, 5.0), LOW), 1e-3)
    assert res.volts[0] == pytest.approx(5.0 * (1e3 + RD) / (2e3 + RD), rel=RTOL)  # Ohm's law divider
    assert res.nets["X"] == res.nets["A"]


def test_zero_duration_and_bad_drive():
    s = ENGINE.open(board(Part("R1", "R", ("A", "B"), 1e3)), ("A", "B"), 1e-12)
    res = s.run((HIGH, LOW), 0.0, sample_times=[0.0, 1.0])
    assert res.duration == 0.0 and not res.crossed
    assert np.isnan(res.samples[1]).all()
    with pytest.raises(ValueError):
        s.run((HIGH,), 1e-3)
