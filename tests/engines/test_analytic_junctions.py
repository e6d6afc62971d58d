"""Analytic engine with piecewise-linear junctions against the Shockley equation
(Sze, Physics of Semiconductor Devices) and scipy's ODE solver."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from incircuit.engines import get_engine
from incircuit.engines.base import Source, Watch
from incircuit.engines.pwl import VT, chord_error, shockley_voltage
from incircuit.model import Board, Model, Part

ENGINE = get_engine("analytic")
RD = 1e-3
LOW = Source(RD, 0.0)
IS, N = 2.52e-9, 1.752  # a small-signal silicon diode model (invented demo values)
DMODEL = Model("DSIG", "D", {"is": IS, "n": N})
#: The documented PWL error bound (two knots per decade), plus 1 uV for GMIN terms.
BOUND = chord_error(math.sqrt(10.0)) * N * VT + 1e-6


def diode_board(*extra: Part) -> Board:
    return Board("t", (Part("D1", "D", ("A", "K"), model="DSIG"),) + extra, {"DSIG": DMODEL})


@pytest.mark.parametrize("target", [1e-3, 10e-6])
def test_forward_voltage_against_shockley(target):
    # drive through R so that about `target` flows; compare V(A)-V(K) with the
    # Shockley equation inverted at the current that actually flows
    vs = 5.0
    r = (vs - shockley_voltage(target, IS, N)) / target
    s = ENGINE.open(diode_board(), ("A", "K"), 30e-12)
    res = s.run((Source(r, vs), LOW), 0.05)
    vd = res.volts[0] - res.volts[1]
    current = (vs - res.volts[0]) / r
    assert current == pytest.approx(target, rel=0.01)
    exact = shockley_voltage(current, IS, N)
    assert exact - BOUND <= vd <= exact + 1e-6  # chords sit on the low side, by at most BOUND
    # near a knot (1 mA and 10 uA are knots) the error is far smaller than the bound
    assert vd == pytest.approx(exact, abs=0.2 * BOUND)


def test_reverse_blocks():
    s = ENGINE.open(diode_board(), ("A", "K"), 30e-12)
    res = s.run((Source(680.0, 0.0), Source(680.0, 5.0)), 0.01)
    # reverse current ~Is (2.5 nA) through 680 ohm: under 2 uV of drop
    assert res.volts[1] - res.volts[0] == pytest.approx(5.0, abs=1e-5)


def test_diode_clamps_capacitor():
    # a capacitor across a forward-biased diode stops charging near the diode's
    # forward voltage instead of reaching the source (Shockley steady state)
    vs, r = 5.0, 680.0
    s = ENGINE.open(diode_board(Part("C1", "C", ("A", "K"), 10e-6)), ("A", "K"), 0.0)
    res = s.run((Source(r, vs), LOW), 0.1)  # 15 RC
    vd = res.volts[0] - res.volts[1]
    current = (vs - res.volts[0]) / r
    assert current == pytest.approx((vs - 0.75) / r, rel=0.05)
    assert shockley_voltage(current, IS, N) - BOUND <= vd <= shockley_voltage(current, IS, N) + 1e-6


def shockley_ode(c, r, vs, t_end, **kw):
    """C dv/dt = (Vs - v)/R - Is (exp(v/(n Vt)) - 1), integrated by Radau."""

    def f(t, v):
        return [((vs - v[0]) / r - IS * math.expm1(v[0] / (N * VT))) / c]

    def jac(t, v):
        return [[(-1.0 / r - IS / (N * VT) * math.exp(v[0] / (N * VT))) / c]]

    return solve_ivp(f, (0, t_end), [0.0], method="Radau", jac=jac, rtol=1e-10, atol=1e-13, **kw)


def test_turn_on_event_and_waveform_against_ode():
    # capacitor across the diode charged through R: the engine switches segments
    # at events; its waveform must follow the exact Shockley ODE within the PWL
    # bound, and the time at which 1 mA flows (a knot) must agree closely.
    c, r, vs = 1e-6, 2.2e3, 5.0
    s = ENGINE.open(diode_board(Part("C1", "C", ("A", "K"), c)), ("A", "K"), 0.0)
    times = np.linspace(0.0, 5e-3, 21)
    res = s.run((Source(r, vs), LOW), 5e-3, sample_times=times)
    ode = shockley_ode(c, r + RD, vs, 5e-3, t_eval=times)
    v = res.samples[:, 0] - res.samples[:, 1]
    # the charge is slow against the diode (quasi-static), so the waveform error is
    # the static chord error; 25 % margin for the lag (observed 0.98 BOUND)
    np.testing.assert_allclose(v, ode.y[0], atol=1.25 * BOUND, rtol=0)
    # time to reach the 1 mA knot voltage
    v1 = shockley_voltage(1e-3, IS, N)
    s = ENGINE.open(diode_board(Part("C1", "C", ("A", "K"), c)), ("A", "K"), 0.0)
    res = s.run((Source(r, vs), LOW), 5e-3, watch=Watch(0, v1, minus=1))
    event = lambda t, y: y[0] - v1  # noqa: E731
    event.terminal = True
    ode = shockley_ode(c, r + RD, vs, 5e-3, events=event)
    t_ode = ode.t_events[0][0]
    # below the knot the chords carry more current than the exponential at the
    # same voltage, which slows the last part of the charge: observed 0.8 %
    assert res.crossed
    assert res.duration == pytest.approx(t_ode, rel=0.02)
    # before the diode conducts noticeably (0.2 V)
    s = ENGINE.open(diode_board(Part("C1", "C", ("A", "K"), c)), ("A", "K"), 0.0)
    res = s.run((Source(r, vs), LOW), 5e-3, watch=Watch(0, 0.2, minus=1))
    rc = (r + RD) * c
    # RC charge t = RC ln(Vs/(Vs - Vth)) (Horowitz & Hill 3rd ed. ch. 1); up to
    # 0.2 V the diode carries at most Is e^(0.2/(n Vt)) = 0.2 uA (its chords a
    # little more) against ~2.2 mA of charging current: 1e-4 relative
    assert res.duration == pytest.approx(rc * math.log(vs / (vs - 0.2)), rel=5e-4)


def test_series_resistor_and_diode_without_capacitance():
    # no capacitance anywhere (stray 0): the junction state comes from the
    # instantaneous solution alone; compare with the Shockley equation plus
    # Ohm's law solved by brentq
    r1, r2, vs = 1e3, 2.2e3, 5.0
    b = diode_board(Part("R1", "R", ("K", "B"), r1), Part("D2", "D", ("B", "E"), model="DSIG"), Part("R2", "R", ("E", "Z"), r2))
    s = ENGINE.open(b, ("A", "Z"), 0.0)
    res = s.run((Source(RD, vs), LOW), 1e-6)
    i = brentq(lambda i: 2 * shockley_voltage(i, IS, N) + i * (r1 + r2 + 2 * RD) - vs, 1e-12, 1e-2)
    i_engine = (res.nets["E"] - res.nets["Z"]) / r2
    # two diodes each within BOUND of Shockley: current within 2 BOUND / (R1 + R2)
    assert i_engine == pytest.approx(i, abs=2 * BOUND / (r1 + r2))
    # reversed drive blocks
    res = s.run((LOW, Source(RD, vs)), 1e-6)
    assert abs(res.nets["E"] - res.nets["Z"]) / r2 < 1e-8


def test_antiparallel_pair_and_zener():
    # anti-parallel diodes conduct both ways; a zener (bv = 5.1 V at ibv = 5 mA)
    # clamps the reverse voltage near bv (SPICE diode model breakdown parameters)
    zen = Model("DZ", "D", {"is": 1e-14, "n": 1.0, "bv": 5.1, "ibv": 5e-3})
    b = Board(
        "t",
        (Part("D1", "D", ("A", "K"), model="DSIG"), Part("D2", "D", ("K", "A"), model="DSIG")),
        {"DSIG": DMODEL},
    )
    s = ENGINE.open(b, ("A", "K"), 30e-12)
    fwd = s.run((Source(680.0, 5.0), LOW), 0.01)
    rev = s.run((LOW, Source(680.0, 5.0)), 0.01)
    assert fwd.volts[0] - fwd.volts[1] == pytest.approx(rev.volts[1] - rev.volts[0], abs=1e-6)
    assert 0.6 < fwd.volts[0] - fwd.volts[1] < 1.0
    s = ENGINE.open(Board("z", (Part("Z1", "D", ("A", "K"), model="DZ"),), {"DZ": zen}), ("A", "K"), 30e-12)
    vs, r = 12.0, 1.38e3  # about 5 mA in breakdown
    res = s.run((LOW, Source(r, vs)), 0.01)
    current = (vs - res.volts[1]) / r
    # breakdown branch V = -bv - n Vt ln(I/ibv) - I rs, as the SPICE model defines it
    exact = 5.1 + VT * math.log(current / 5e-3)
    assert res.volts[1] - res.volts[0] == pytest.approx(exact, abs=chord_error(math.sqrt(10.0)) * VT + 1e-6)


def test_state_and_junctions_carry_across_steps():
    # charge a capacitor behind a diode, then float: the diode blocks the
    # discharge back into the (now floating) probe; then discharge through R.
    c = 1e-6
    b = diode_board(Part("C1", "C", ("K", "G"), c))
    s = ENGINE.open(b, ("A", "G"), 30e-12)
    s.run((Source(680.0, 5.0), LOW), 0.05)
    charged = s.run((Source(680.0, 0.0), LOW), 0.01)
    # the diode is reverse-biased now: C1 holds 5 V less the diode's voltage at
    # the small current that flowed last (0.2-0.5 V for this diode below 10 uA)
    assert 4.5 < charged.nets["K"] - charged.nets["G"] < 4.8
    held = s.run((None, LOW), 0.01)
    assert held.nets["K"] == pytest.approx(charged.nets["K"], rel=1e-4)


def test_floating_probe_behind_two_junctions_does_not_chatter():
    # Regression: a floating capacitor island (no stray) with a 100 uF capacitor
    # between two unprobed nets and picofarads to the probes. The probe charges the
    # rail through two junctions, then floats: with nets as coordinates the large
    # and small capacitances shared coordinates and rounding (nanovolts) made a
    # junction switch segments back and forth at a knot until the step gave up.
    model = Model("DP", "D", {"is": 1e-14, "n": 1.0})
    b = Board(
        "t",
        (
            Part("DH", "D", ("IN1", "VCC"), model="DP"),
            Part("DL", "D", ("GND", "IN2"), model="DP"),
            Part("C1", "C", ("VCC", "GND"), 100e-6),
            Part("CA", "C", ("IN1", "GND"), 6e-12),
            Part("CB", "C", ("IN2", "GND"), 6e-12),
            Part("CC", "C", ("IN1", "VCC"), 1e-12),
        ),
        {"DP": model},
    )
    s = ENGINE.open(b, ("IN1", "IN2"), 0.0)
    s.run((Source(700.0, 5.0), Source(20.0, 0.0)), 0.01)
    res = s.run((None, Source(20.0, 0.0)), 0.01)  # raised EngineError before
    # the rail keeps its charge (100 uF, nothing discharges it but GMIN): about
    # (5 V - 2 Vf)(1 - e^(-10 ms / 72 ms)) = 0.47 V (RC charge, Horowitz & Hill ch. 1)
    assert 0.35 < res.nets["VCC"] - res.nets["GND"] < 0.6
    # the floating probe sits at most a diode drop above the rail (Shockley: it
    # cannot hold more than the forward voltage at its own tiny current)
    assert -1e-3 < res.volts[0] - res.nets["VCC"] < 0.7
