"""The tester's closed forms against the textbook step responses.

References: RC charge, RL current rise and the voltage divider: Horowitz &
Hill, The Art of Electronics, 3rd ed., ch. 1 (V(t) = Vs (1 - exp(-t/RC)),
i(t) = (V/R)(1 - exp(-tR/L)), Vout = Vin R2/(R1 + R2)). Circuits with more
than one resistor are integrated independently with scipy's solve_ivp.

Tolerances: the forward expressions are evaluated in double precision and
inverted exactly, so rtol=1e-9 covers rounding; against solve_ivp the
integrator's rtol=1e-10/atol=1e-13 bounds the error, so rtol=1e-6 is ample.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from incircuit.tester import formulas as fm

VS = 5.0
VTH = 1.1


@pytest.mark.parametrize("r,c", [(470e3, 100e-12), (470e3, 220e-9), (700.0, 4.7e-6), (700.0, 330e-6)])
def test_threshold_time_inverts_rc_charge_horowitz_hill_ch1(r, c):
    # Horowitz & Hill ch.1: V(t) = Vs (1 - exp(-t/RC)); time to Vth = RC ln(Vs / (Vs - Vth))
    t = r * c * math.log(VS / (VS - VTH))
    assert fm.threshold_capacitance(t, r, r, VS, VTH) == pytest.approx(c, rel=1e-9)


def test_threshold_time_with_far_probe_resistance_against_solve_ivp():
    # Vs -Ra- A -C- B -Rb- 0, the comparator watches A: integrate the loop and time the crossing
    ra, rb, c, v0 = 702.0, 20.0, 10e-6, 0.004
    rt = ra + rb

    def rhs(t, y):
        return [(VS - y[0]) / (rt * c)]

    def va_minus_vth(t, y):
        i = (VS - y[0]) / rt
        return VS - i * ra - VTH
    va_minus_vth.terminal = True
    sol = solve_ivp(rhs, (0, 0.1), [v0], events=va_minus_vth, rtol=1e-10, atol=1e-13)
    t_cross = float(sol.t_events[0][0])
    assert fm.threshold_capacitance(t_cross, ra, rt, VS, VTH, v0) == pytest.approx(c, rel=1e-6)


@pytest.mark.parametrize("c,t", [(4.7e-3, 0.12), (10e-3, 0.37), (1e-3, 0.02)])
def test_fixed_time_charge_horowitz_hill_ch1(c, t):
    # C = T / (R ln(Vs / (Vs - V))) from V(T) = Vs (1 - exp(-T/RC)), also from a start voltage
    r = 722.0
    v = VS * (1 - math.exp(-t / (r * c)))
    assert fm.fixed_time_capacitance(t, r, VS, v) == pytest.approx(c, rel=1e-9)
    v0 = 0.01
    v_from = VS - (VS - v0) * math.exp(-t / (r * c))
    assert fm.fixed_time_capacitance(t, r, VS, v_from, v0) == pytest.approx(c, rel=1e-9)


def test_fixed_time_limits():
    # no movement: no finite capacitance; at the supply: no resolution left
    assert fm.fixed_time_capacitance(0.1, 700.0, VS, 0.0) == math.inf
    assert fm.fixed_time_capacitance(0.1, 700.0, VS, VS) == 0.0


@pytest.mark.parametrize("l,r_part", [(10e-6, 0.0), (1e-3, 5.0), (100e-3, 300.0)])
def test_rise_time_inverts_rl_current_horowitz_hill_ch1(l, r_part):
    # Horowitz & Hill ch.1: i(t) = I_inf (1 - exp(-t R / L)); the sense resistor sees i * Rs
    r_sense = 20.0 if r_part < 50 else 700.0
    r_total = 22.0 + r_part + r_sense
    v_inf = VS * r_sense / r_total
    t = l / r_total * math.log(v_inf / (v_inf - VTH))
    assert fm.rise_inductance(t, r_total, r_sense, VS, VTH) == pytest.approx(l, rel=1e-9)


def test_rise_time_against_solve_ivp():
    # L di/dt = Vs - i R, crossing i Rs = Vth found by the integrator
    l, r_total, r_sense = 2.2e-3, 64.0, 20.0
    sol = solve_ivp(lambda t, y: [(VS - y[0] * r_total) / l], (0, 1e-3), [0.0],
                    events=lambda t, y: y[0] * r_sense - VTH, rtol=1e-10, atol=1e-13)
    t_cross = float(sol.t_events[0][0])
    assert fm.rise_inductance(t_cross, r_total, r_sense, VS, VTH) == pytest.approx(l, rel=1e-6)


def test_rise_never_reaches_threshold():
    assert fm.rise_inductance(1e-6, 1000.0, 20.0, VS, VTH) == math.inf


@pytest.mark.parametrize("rx,rk", [(10.0, 702.0), (4.7e3, 700.0), (1e6, 470020.0)])
def test_divider_horowitz_hill_ch1(rx, rk):
    # Vout = Vin R2 / (R1 + R2): the probe at the top of Rx, current read over the known Rk
    i = VS / (rk + rx)
    va = VS - i * rk
    assert fm.divider_resistance(va, 0.0, (VS - va) / rk) == pytest.approx(rx, rel=1e-9)
    assert fm.divider_resistance(va, 0.0, 0.0) == math.inf


def test_esr_from_the_step_of_a_series_rc():
    # Series R-C driven by a current step: v(t) = v0 + I R + I t / C (Horowitz & Hill ch.1, i = C dv/dt)
    esr, c, i, t, v0 = 0.8, 100e-6, 6.9e-3, 4e-6, 0.002
    v = v0 + i * esr + i * t / c
    assert fm.series_esr(v0, v, i, t, c) == pytest.approx(esr, rel=1e-9)


def test_relative_drop_of_an_rc_decay():
    # V(t) = V0 exp(-t / RC): the drop after t is 1 - exp(-t / RC)
    r, c, t = 1e6, 1e-6, 0.02
    assert fm.relative_drop(1.0, math.exp(-t / (r * c))) == pytest.approx(1 - math.exp(-0.02), rel=1e-9)
    assert math.isnan(fm.relative_drop(0.0, 0.0))


def test_resolution_sums_the_change_per_count():
    # f = x * y: one step in x changes f by y, one in y by x (plus the cross term when both move alone)
    got = fm.resolution(lambda x, y: x * y, [2.0, 3.0], {0: 0.5, 1: 0.25})
    assert got == pytest.approx(3.0 * 0.5 + 2.0 * 0.25, rel=1e-12)
    # a step that leaves the formula's range gives no finite resolution
    assert fm.resolution(lambda x: math.inf if x > 1 else x, [1.0], {0: 0.5}) == math.inf
