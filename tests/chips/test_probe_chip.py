"""A probe on an unpowered chip's input charges the rail's bulk capacitor.

Two input pins of an unpowered chip, probed with the tester's low resistor,
conduct through two junctions in series (pin 1 -> supply rail, ground rail
-> pin 2) into the bulk capacitor across the rails. The reference is the
ideal-diode (Shockley) equation, Sze, *Physics of Semiconductor Devices*,
``V = n Vt ln(1 + I / Is)`` with ``Vt = k T / q`` at 300.15 K (the SPICE
default nominal temperature, ngspice manual ``.options TNOM``; k and q
exact SI values, CODATA 2018), and the capacitor law ``dVc/dt = I / C``
(Horowitz & Hill, *The Art of Electronics*, 3rd ed., ch. 1), integrated
with scipy's ``solve_ivp`` and ``brentq``.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from incircuit.chips import apply_pin_roles
from incircuit.chips.pinmodels import PIN_MODEL_VALUES
from incircuit.chips.roles import parse_roles
from incircuit.engines import get_engine
from incircuit.engines.base import Source
from incircuit.engines.ngspice import available
from incircuit.model import Board, Part
from incircuit.tester.bench import Bench
from incircuit.tester.conduction import pulse
from incircuit.tester.profile import load_profile

K_B, Q_E = 1.380649e-23, 1.602176634e-19  # CODATA 2018 exact values
VT = K_B * 300.15 / Q_E
IS = PIN_MODEL_VALUES["diode_is"][0]
N = PIN_MODEL_VALUES["diode_n"][0]
C_DIE = PIN_MODEL_VALUES["supply_capacitance"][0]
ROLES = parse_roles('[subckt."CHIP-T"]\npins = ["input", "input", "supply", "ground"]\n', "t.toml")

ENGINES = ["analytic", pytest.param("ngspice", marks=pytest.mark.skipif(
    available() is not None, reason=f"ngspice not available: {available()}"))]
#: Analytic engine: its piecewise-linear junction is low by at most 4.2 mV per
#: junction (chord bound documented in engines/pwl.py); two junctions + 1 mV.
#: ngspice solves the Shockley equation itself: 1 mV for its time stepping.
ATOL = {"analytic": 9.5e-3, "ngspice": 1e-3}


def _board(bulk: float) -> Board:
    chip = Part("U1", "X", ("IN1", "IN2", "VCC", "GND"), model="CHIP-T")
    parts = (chip, Part("C1", "C", ("VCC", "GND"), bulk),
             # each input fed through a series resistor from an unplugged connector
             Part("R1", "R", ("IN1", "J1"), 1e6), Part("R2", "R", ("IN2", "J2"), 1e6))
    return apply_pin_roles(Board("chip-input", parts), [ROLES])


def _vd(i: float) -> float:
    return N * VT * math.log1p(i / IS)


def _reference(bulk: float, r_total: float, vs: float, times: list[float]) -> np.ndarray:
    """V(probe 1) - V(probe 2): two Shockley junctions in series with the rail capacitance."""
    c = bulk + C_DIE

    def current(vc: float) -> float:
        return brentq(lambda i: vs - i * r_total - 2 * _vd(i) - vc, 0.0, vs / r_total, xtol=1e-15)

    sol = solve_ivp(lambda t, y: [current(y[0]) / c], (0.0, times[-1]), [0.0], t_eval=times,
                    rtol=1e-10, atol=1e-13)
    return np.array([vc + 2 * _vd(current(vc)) for vc in sol.y[0]])


@pytest.mark.parametrize("engine", ENGINES)
def test_two_junction_drops_then_the_bulk_capacitor_charges(engine):
    profile = load_profile()
    bulk, vs = 100e-6, profile.supply_volts
    r_drive = profile.port_high_ohms + profile.probe_ohms(0, "low")
    r_total = r_drive + profile.port_low_ohms
    times = [20e-6, 100e-6, 1e-3, 2e-3, 4e-3, 6e-3, 8e-3, 10e-3]
    session = get_engine(engine).open(_board(bulk), ("IN1", "IN2"), stray=0.0)
    result = session.run((Source(r_drive, vs), Source(profile.port_low_ohms, 0.0)), times[-1],
                         sample_times=times)
    v_a = result.samples[:, 0]
    got = v_a - result.samples[:, 1]
    want = _reference(bulk, r_total, vs, times)
    # at 20 us the capacitor holds a millivolt: the first sample is two diode drops
    assert want[0] - 2 * _vd((vs - want[0]) / r_total) < 2e-3
    np.testing.assert_allclose(got, want, rtol=0, atol=ATOL[engine])

    # the capacitance the probes see: charge delivered / rise of the capacitor voltage
    current = (vs - v_a) / r_drive
    vc = got - np.array([2 * _vd(i) for i in current])
    sl = slice(2, None)  # from 1 ms on, the junction currents change slowly
    charge = np.trapezoid(current[sl], times[sl])
    seen = charge / (vc[sl][-1] - vc[sl][0])
    # rtol 2 %: trapezoidal rule on 6 samples of a current that falls ~10 %,
    # and the junction model's error enters through a 0.35 V rise
    assert seen == pytest.approx(bulk + C_DIE, rel=0.02)


@pytest.mark.parametrize("engine", ENGINES)
def test_tester_conduction_pulse_reads_two_drops_and_the_charging_rate(engine):
    profile = load_profile()
    bulk = 100e-6
    session = get_engine(engine).open(_board(bulk), ("IN1", "IN2"), stray=0.0)
    bench = Bench(session, profile, trace_points=0)
    p = pulse(bench, 0, 1, "low")
    assert p.conducting and p.rising  # conducts and charges: a junction beside a capacitor
    length = profile.conduction_low_seconds
    r_total = profile.port_high_ohms + profile.probe_ohms(0, "low") + profile.port_low_ohms
    mid, end = _reference(bulk, r_total, profile.supply_volts, [length / 2, length])
    lsb = p.lsb
    # two ADC counts for the two readings, plus the analytic junction bound
    assert p.v_end == pytest.approx(end, abs=2 * lsb + ATOL[engine])
    assert p.v_mid == pytest.approx(mid, abs=2 * lsb + ATOL[engine])
    # the charging rate gives the rail's capacitance: C = I dt / dV
    seen = p.current * (length / 2) / (p.v_end - p.v_mid)
    # rtol 10 %: four readings of +-1 count (4.9 mV) on a ~0.22 V rise (~4.5 %)
    # and the current at the end of the pulse, ~3 % below its mean over the half
    assert seen == pytest.approx(bulk, rel=0.10)
