"""The ngspice engine on the Session interface, against closed forms.

References: RC and RL step responses, voltage divider: Horowitz & Hill,
The Art of Electronics, 3rd ed., ch. 1. Diode equation: Sze, Physics of
Semiconductor Devices (Shockley). Boltzmann constant and elementary charge:
CODATA 2018 (exact SI values).

Tolerances: ngspice's Newton iterations stop at reltol=1e-4 of the node
voltage, and its local-truncation-error control (trtol=1e-3) keeps the
time-domain error of these networks below about 1e-4 V (measured); the
margins below are a few times that.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from incircuit.engines import get_engine
from incircuit.engines.base import Source, Watch
from incircuit.engines.ngspice import available
from incircuit.errors import EngineError
from incircuit.model import Board, Model, Part

REASON = available()
pytestmark = pytest.mark.skipif(REASON is not None, reason=f"ngspice not available: {REASON}")

ENGINE = get_engine("ngspice") if REASON is None else None
VS = 5.0
#: Time-domain error bound (V): measured <1e-4 V on these networks, 10x margin.
ATOL_TRACE = 1e-3
#: Newton tolerance of a junction voltage (V): reltol 1e-4 of ~0.7 V plus margin.
ATOL_NEWTON = 2e-4
K_BOLTZMANN = 1.380649e-23  # J/K, CODATA 2018
Q_ELECTRON = 1.602176634e-19  # C, CODATA 2018
VT_27C = K_BOLTZMANN * 300.15 / Q_ELECTRON  # ngspice's default temperature is 27 degC


def rc_board(r: float, c: float) -> Board:
    return Board("rc", (Part("R1", "R", ("IN", "OUT"), r), Part("C1", "C", ("OUT", "GND"), c)))


def test_engine_name_and_probe_nets():
    session = ENGINE.open(rc_board(1e3, 1e-6), ("IN", "GND"), 0.0)
    assert ENGINE.name == "ngspice"
    assert session.probe_nets == ("IN", "GND")


def test_rc_charge_samples_horowitz_hill_ch1():
    # V(t) = Vs (1 - exp(-t/RC)), Horowitz & Hill 3rd ed. ch. 1
    r, c = 10e3, 100e-9
    tau = r * c
    session = ENGINE.open(rc_board(r, c), ("IN", "GND"), 0.0)
    times = np.array([0.0, 0.1, 0.5, 1.0, 2.0, 3.0, 5.0]) * tau
    step = session.run((Source(r / 2, VS), Source(r / 2, 0.0)), 5 * tau, sample_times=times)
    # the two source resistors and R1 in series charge C1: tau' = 2 r c
    v_c = VS * (1 - np.exp(-times / (2 * tau)))
    # probe IN sits between Rs_in and R1: V_in = Vs - i*Rs, i = (Vs - Vc)/(2r)
    v_in = VS - (VS - v_c) / (2 * r) * (r / 2)
    assert step.samples.shape == (len(times), 2)
    np.testing.assert_allclose(step.samples[1:, 0], v_in[1:], rtol=0, atol=ATOL_TRACE)
    assert not step.crossed and step.duration == 5 * tau
    v_c_end = step.nets["OUT"] - step.nets["GND"]
    assert v_c_end == pytest.approx(VS * (1 - math.exp(-2.5)), abs=ATOL_TRACE)


def test_rc_time_to_threshold_horowitz_hill_ch1():
    # t = RC ln(Vs / (Vs - Vth)), the capacitance-by-time method
    r, c = 470e3, 1e-9
    for vth in (0.5, 1.1, 3.5):
        session = ENGINE.open(rc_board(1.0, c), ("OUT", "GND"), 0.0)
        step = session.run((Source(r, VS), Source(0.0, 0.0)), 1.0, watch=Watch(0, vth))
        expected = (r + 1.0) * c * math.log(VS / (VS - vth))
        assert step.crossed
        # crossing interpolated on a 200-point second run: error ~1e-5
        assert step.duration == pytest.approx(expected, rel=5e-4)
        assert step.volts[0] == pytest.approx(vth, abs=ATOL_NEWTON)


def test_watch_falling_and_between_probes():
    # discharge of a charged capacitor: V = V0 exp(-t/RC), Horowitz & Hill ch. 1
    r, c = 1e3, 1e-6
    session = ENGINE.open(rc_board(1e-3, c), ("OUT", "GND"), 0.0)
    session.run((Source(1.0, VS), Source(1.0, 0.0)), 50e-6)
    step = session.run((Source(r, 0.0), Source(0.0, 0.0)), 1.0, watch=Watch(0, 1.0, minus=1, rising=False))
    assert step.crossed
    assert step.duration == pytest.approx((r + 1e-3) * c * math.log(VS / 1.0), rel=5e-4)
    # the crossing ends the step: the state goes on from there
    after = session.run((None, None), 1e-9)
    assert after.volts[0] - after.volts[1] == pytest.approx(1.0, abs=ATOL_NEWTON)


def test_watch_samples_after_crossing_are_nan():
    r, c = 1e3, 1e-6
    session = ENGINE.open(rc_board(1e-3, c), ("OUT", "GND"), 0.0)
    times = [0.1e-3, 1e-3, 5e-3]
    step = session.run((Source(r, VS), Source(0.0, 0.0)), 0.1, watch=Watch(0, 2.5), sample_times=times)
    t_cross = r * c * math.log(2)
    assert step.duration == pytest.approx(t_cross, rel=5e-4)
    assert step.samples[0, 0] == pytest.approx(VS * (1 - math.exp(-0.1)), abs=ATOL_TRACE)
    assert np.isnan(step.samples[1:]).all()


def test_already_past_level_crosses_at_once():
    session = ENGINE.open(rc_board(1e-3, 1e-6), ("OUT", "GND"), 0.0)
    session.run((Source(1.0, VS), Source(1.0, 0.0)), 50e-6)
    step = session.run((Source(1e3, VS), Source(0.0, 0.0)), 1e-3, watch=Watch(0, 2.5))
    assert step.crossed and step.duration == 0.0


def test_rl_current_rise_horowitz_hill_ch1():
    # i(t) = Vs/R (1 - exp(-t R/L)); probe A reads Vs - Ra i
    ra, rb, ind = 680.0, 22.0, 10e-3
    board = Board("rl", (Part("L1", "L", ("A", "B"), ind),))
    session = ENGINE.open(board, ("A", "B"), 0.0)
    tau = ind / (ra + rb)
    times = np.array([0.25, 0.5, 1.0, 2.0, 4.0]) * tau
    step = session.run((Source(ra, VS), Source(rb, 0.0)), 4 * tau, sample_times=times)
    i = VS / (ra + rb) * (1 - np.exp(-times / tau))
    np.testing.assert_allclose(step.samples[:, 0], VS - ra * i, rtol=0, atol=ATOL_TRACE)
    np.testing.assert_allclose(step.samples[:, 1], rb * i, rtol=0, atol=ATOL_TRACE)


def test_inductor_current_carries_over():
    # splitting one step in two must not change the answer (state carry-over)
    ra, rb, ind = 680.0, 22.0, 10e-3
    board = Board("rl", (Part("L1", "L", ("A", "B"), ind), Part("C1", "C", ("A", "B"), 1e-9)))
    drive = (Source(ra, VS), Source(rb, 0.0))
    tau = ind / (ra + rb)
    whole = ENGINE.open(board, ("A", "B"), 1e-12).run(drive, 2 * tau)
    split = ENGINE.open(board, ("A", "B"), 1e-12)
    split.run(drive, 0.7 * tau)
    second = split.run(drive, 1.3 * tau)
    np.testing.assert_allclose(second.volts, whole.volts, rtol=0, atol=ATOL_TRACE)


def test_divider_horowitz_hill_ch1():
    # Vout = Vin R2 / (R1 + R2) on an unprobed middle net
    board = Board("div", (Part("R1", "R", ("A", "M"), 3e3), Part("R2", "R", ("M", "B"), 1e3)))
    step = ENGINE.open(board, ("A", "B"), 30e-12).run((Source(0.0, VS), Source(0.0, 0.0)), 1e-6)
    assert step.nets["M"] == pytest.approx(VS * 1e3 / 4e3, abs=ATOL_NEWTON)
    assert set(step.nets) == {"A", "M", "B"}


def _shockley_v(i_s: float, n: float, r: float, vs: float) -> float:
    """The V that solves (vs - V)/r = Is (exp(V/(n Vt)) - 1) (Sze)."""
    return brentq(lambda v: (vs - v) / r - i_s * math.expm1(v / (n * VT_27C)), 0.0, vs)


@pytest.mark.parametrize("r", [680.0, 470e3])
def test_diode_forward_voltage_shockley_sze(r):
    # an invented silicon diode; ngspice adds gmin=1e-12 S across the junction (<1e-9 A here)
    i_s, n = 2.5e-9, 1.75
    board = Board("d", (Part("D1", "D", ("A", "K"), model="DX"),), models={"DX": Model("DX", "D", {"is": i_s, "n": n})})
    session = ENGINE.open(board, ("A", "K"), 20e-12)
    step = session.run((Source(r, VS), Source(0.0, 0.0)), 200e-6)
    assert step.volts[0] - step.volts[1] == pytest.approx(_shockley_v(i_s, n, r, VS), abs=ATOL_NEWTON)
    reverse = ENGINE.open(board, ("A", "K"), 20e-12).run((Source(0.0, 0.0), Source(r, VS)), 200e-6)
    # in reverse only the saturation current Is flows (Sze): V = Vs - Is r
    assert reverse.volts[1] == pytest.approx(VS - i_s * r, abs=ATOL_NEWTON)


def test_diode_capacitor_state_carries_over():
    board = Board("dc", (Part("D1", "D", ("A", "K"), model="DX"), Part("C1", "C", ("K", "G"), 1e-6),
                         Part("R1", "R", ("K", "G"), 10e3)),
                  models={"DX": Model("DX", "D", {"is": 1e-14, "n": 1.0, "cjo": 5e-12, "rs": 1.0})})
    drive = (Source(680.0, VS), Source(0.0, 0.0))
    whole = ENGINE.open(board, ("A", "G"), 20e-12).run(drive, 3e-3)
    split = ENGINE.open(board, ("A", "G"), 20e-12)
    for _ in range(3):
        last = split.run(drive, 1e-3)
    np.testing.assert_allclose(last.volts, whole.volts, rtol=0, atol=ATOL_TRACE)
    assert whole.nets["K"] == pytest.approx(last.nets["K"], abs=ATOL_TRACE)


def test_floating_probe_keeps_its_charge():
    # a probe on a net of no part: only its stray capacitance (RC with the stray)
    stray, r = 20e-12, 470e3
    session = ENGINE.open(rc_board(1e3, 1e-6), ("LONE", "GND"), stray)
    tau = r * stray
    step = session.run((Source(r, VS), Source(0.0, 0.0)), tau)
    assert step.volts[0] == pytest.approx(VS * (1 - math.exp(-1)), abs=ATOL_TRACE)
    held = session.run((None, Source(0.0, 0.0)), 1e-3)
    # the only leak is the 1e12 ohm to ground: tau_leak = 20 s
    assert held.volts[0] == pytest.approx(step.volts[0], rel=1e-3)


def test_board_net_named_zero_floats():
    # the board's "0" is not the tester's ground
    board = Board("z", (Part("R1", "R", ("0", "A"), 1e3), Part("R2", "R", ("0", "B"), 1e3)))
    step = ENGINE.open(board, ("A",), 20e-12).run((Source(680.0, VS),), 1e-6)
    assert step.nets["0"] == pytest.approx(VS, abs=1e-6)
    assert step.nets["B"] == pytest.approx(VS, abs=1e-6)


def test_zero_ohm_resistor_merges_nets():
    board = Board("j", (Part("R0", "R", ("A", "B"), 0.0), Part("R1", "R", ("B", "C"), 1e3)))
    step = ENGINE.open(board, ("A", "C"), 0.0).run((Source(1e3, VS), Source(0.0, 0.0)), 1e-6)
    assert step.nets["A"] == step.nets["B"] == pytest.approx(VS / 2, abs=ATOL_NEWTON)


def test_zero_duration_step_keeps_state():
    session = ENGINE.open(rc_board(1e3, 1e-6), ("OUT", "GND"), 0.0)
    first = session.run((Source(1e3, VS), Source(0.0, 0.0)), 1e-3)
    nothing = session.run((None, None), 0.0, sample_times=[0.0, 1.0])
    assert nothing.volts == first.volts
    assert nothing.samples[0, 0] == first.volts[0] and np.isnan(nothing.samples[1]).all()


def test_convergence_failure_is_an_engine_error_naming_the_model():
    board = Board("bad", (Part("D1", "D", ("A", "B"), model="DBAD"), Part("L1", "L", ("A", "B"), 1.0),
                          Part("C1", "C", ("A", "B"), 1e-9)),
                  models={"DBAD": Model("DBAD", "D", {"is": 1e-14, "n": -1.0})})
    session = ENGINE.open(board, ("A", "B"), 1e-12)
    with pytest.raises(EngineError) as info:
        session.run((Source(20.0, VS), Source(20.0, 0.0)), 1e-3)
    assert "DBAD of D1" in info.value.hint and "--engine analytic" in info.value.hint
    # ngspice is still usable afterwards
    ok = ENGINE.open(rc_board(1e3, 1e-6), ("IN", "GND"), 0.0).run((Source(0.0, VS), Source(0.0, 0.0)), 1e-6)
    assert ok.volts[0] == pytest.approx(VS, abs=1e-5)  # 1 mohm sources into 1 kohm


def test_wrong_drive_length_is_rejected():
    session = ENGINE.open(rc_board(1e3, 1e-6), ("IN", "GND"), 0.0)
    with pytest.raises(ValueError):
        session.run((Source(1.0, VS),), 1e-6)


def _rl_crossing(board: Board) -> float:
    session = ENGINE.open(board, ("A", "B"), 30e-12)
    step = session.run((Source(22.0, VS), Source(20.0, 0.0)), 1e-3, watch=Watch(1, 1.1))
    assert step.crossed
    return step.duration


def test_parts_hanging_off_one_net_change_nothing():
    # Kirchhoff's current law: a loop or chain attached at a single net carries no current
    l1 = Part("L1", "L", ("A", "B"), 2.7e-3, params={"dcr": 0.45})
    alone = _rl_crossing(Board("l", (l1,)))
    hanging = Board("l", (l1, Part("L2", "L", ("A", "X"), 0.7e-3, params={"dcr": 0.1}),
                          Part("L3", "L", ("X", "Y"), 72e-6, params={"dcr": 10.8}),
                          Part("L4", "L", ("Y", "A"), 2.8e-3), Part("C9", "C", ("Y", "Z"), 1e-6),
                          Part("L5", "L", ("Z", "W"), 1e-3)))
    # i(t) = Vs/R (1 - exp(-t R/L)) crossing 1.1 V on 20 ohm (Horowitz & Hill ch. 1)
    r = 22.0 + 20.0 + 0.45
    expected = -2.7e-3 / r * math.log(1 - 1.1 / 20.0 * r / VS)
    assert alone == pytest.approx(expected, rel=1e-3)  # the stray capacitance shifts it by ~1e-6 s/ms
    assert _rl_crossing(hanging) == pytest.approx(alone, rel=1e-4)


def test_open_winding_does_not_load_its_partner():
    l1 = Part("L1", "L", ("A", "B"), 2.7e-3, params={"dcr": 0.45})
    alone = _rl_crossing(Board("l", (l1,)))
    open_secondary = Board("t", (l1, Part("L2", "L", ("S", "T"), 1e-3),
                                 Part("K1", "K", (), 0.95, params={"inductors": ("L1", "L2")})))
    assert _rl_crossing(open_secondary) == pytest.approx(alone, rel=1e-4)
    # a loaded secondary reflects its load: the primary's current rises faster
    loaded = Board("t", (*open_secondary.parts, Part("RL", "R", ("S", "T"), 10.0)))
    assert _rl_crossing(loaded) < 0.5 * alone


def test_run_that_needs_too_many_points_is_an_engine_error(monkeypatch):
    from incircuit.engines import spice_lib

    monkeypatch.setattr(spice_lib, "MAX_POINTS", 50)
    session = ENGINE.open(rc_board(1e3, 1e-6), ("IN", "GND"), 30e-12)
    with pytest.raises(EngineError) as info:
        session.run((Source(680.0, VS), Source(0.0, 0.0)), 10e-3)
    assert "time points" in str(info.value) and "--engine analytic" in info.value.hint


def test_reported_nets_are_the_board_nets_joined_to_a_probe():
    board = Board("n", (Part("C1", "C", ("A", "B"), 1e-6, params={"esr": 0.5}),
                        Part("R1", "R", ("B", "M"), 1e3), Part("R2", "R", ("X", "Y"), 1e3)))
    step = ENGINE.open(board, ("A", "B"), 30e-12).run((Source(680.0, VS), Source(20.0, 0.0)), 1e-4)
    assert set(step.nets) == {"A", "B", "M"}  # no C1~ESR, no island X-Y
