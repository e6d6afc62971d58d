"""Lift plans and bench advice on hand-analysed networks.

Sources: parallel combination and current division, Horowitz & Hill, *The
Art of Electronics*, 3rd ed., ch. 1 (H&H); S = Rp/(R+Rp) for a part R beside
Rp (derivative of R||Rp); three-terminal guarded measurement and the LCR
meter's parallel mode for a capacitor beside a resistor: common practice.
"""

from __future__ import annotations

import pytest

from incircuit.judge import judge
from incircuit.judge.lift import lift_candidates
from incircuit.model import Board, Model, Part, Tolerance
from incircuit.predict import predict
from incircuit.tester.profile import load_profile

PROFILE = load_profile()
DX = {"DX": Model("DX", "D", {"is": 1e-14, "n": 1.0})}


def _judge(board: Board, part: str, **kw):
    return judge(board, part, predict(board, part, profile=PROFILE), PROFILE, "analytic", **kw)


def test_lift_plan_junction_path_beside_resistor():
    # R1 between A and B, D1 from A to C, R2 from C to B. Lifting either leg of R1
    # (probes on R1's own pins) leaves the D1-R2 path hanging from one probe only;
    # lifting D1's leg on A or R2's leg on B breaks the path: all four read R1 alone.
    b = Board("t", (Part("R1", "R", ("A", "B"), 10e3), Part("D1", "D", ("A", "C"), model="DX"),
                    Part("R2", "R", ("C", "B"), 100.0)), DX)
    j = _judge(b, "R1", all_neighbours=True)
    assert j.verdict == "masked"
    plan = [(x.action.part, x.action.pin, x.verdict) for x in j.lift]
    assert plan[:2] == [("R1", 1, "reliable"), ("R1", 2, "reliable")]
    assert set(plan[2:]) == {("D1", 1, "reliable"), ("R2", 2, "reliable")}
    leg1 = j.lift[0]
    assert leg1.probes == ("R1.PIN1~LIFTED", "B")
    # rtol 1 %: the tester's divider reading of 10 kohm
    assert leg1.reading.value == pytest.approx(10e3, rel=0.01)
    # by default the neighbours are not tried once the part's own leg is reliable
    assert [x.action.part for x in _judge(b, "R1").lift] == ["R1", "R1"]


def test_lift_plan_ranks_neighbours_by_verdict_hh_ch1():
    # R1 = 10 kohm beside R2 = 100 ohm and R3 = 20 kohm, probed from test pads TA
    # and TB, each 10 ohm away. Lifting R2 leaves 10k || 20k + 20 = 6.69 kohm with
    # S = 20/30 (predictable); lifting R3 leaves 10k || 100 + 20 (S = 0.01, masked);
    # lifting a leg of R1 (the probes stay on the pads) leaves R2 || R3 alone
    # (S = 0, masked); lifting R5 or R6 leaves a pad bare (nothing found, masked).
    b = Board("t", (Part("R1", "R", ("A", "B"), 10e3, tolerance=Tolerance.symmetric(0.05)),
                    Part("R2", "R", ("A", "B"), 100.0), Part("R3", "R", ("A", "B"), 20e3),
                    Part("R5", "R", ("TA", "A"), 10.0), Part("R6", "R", ("B", "TB"), 10.0)))
    prediction = predict(b, "R1", ("TA", "TB"), profile=PROFILE)
    j = judge(b, "R1", prediction, PROFILE, "analytic")
    order = [(x.action.part, x.verdict) for x in j.lift]
    assert order[:3] == [("R2", "predictable"), ("R1", "masked"), ("R1", "masked")]
    assert sorted(order[3:]) == [("R3", "masked"), ("R5", "masked"), ("R6", "masked")]
    r2 = j.lift[0]
    assert r2.probes == ("TA", "TB")
    assert r2.reading.value == pytest.approx(20e3 / 3 + 20, rel=0.01)  # rtol: tester accuracy
    assert r2.sensitivity == pytest.approx(2 / 3, abs=0.05)            # one-sided +10 % difference


def test_neighbours_worse_than_own_leg_are_left_out():
    # with the probes on R1's own pins a lifted leg of R1 is R1 alone (reliable);
    # lifting R2 (leaving 10k || 20k) or R3 (leaving 10k || 100) does worse
    b = Board("t", (Part("R1", "R", ("A", "B"), 10e3, tolerance=Tolerance.symmetric(0.05)),
                    Part("R2", "R", ("A", "B"), 100.0), Part("R3", "R", ("A", "B"), 20e3)))
    j = _judge(b, "R1", all_neighbours=True)
    assert [(x.action.part, x.verdict) for x in j.lift] == [("R1", "reliable"), ("R1", "reliable")]


def test_equal_legs_prefer_the_less_crowded_net_common_practice():
    # R1 from SIG to GND; GND also carries three other parts: lifting the leg on
    # SIG is ranked first (less copper to heat)
    b = Board("t", (Part("R1", "R", ("SIG", "GND"), 10e3), Part("R2", "R", ("SIG", "GND"), 100.0),
                    Part("C1", "C", ("V1", "GND"), 1e-9), Part("C2", "C", ("V2", "GND"), 1e-9)))
    j = _judge(b, "R1")
    assert (j.lift[0].action.part, j.lift[0].action.net) == ("R1", "SIG")


def test_lift_candidates_neighbour_leg_on_probed_net():
    b = Board("t", (Part("R1", "R", ("A", "B"), 1e3), Part("R2", "R", ("C", "A"), 1e3),
                    Part("R3", "R", ("C", "D"), 1e3), Part("R4", "R", ("B", "D"), 1e3)))
    got = [(a.part, a.pin, a.net, a.own) for a in lift_candidates(b, "R1", ("A", "B"))]
    assert got == [("R1", 1, "A", True), ("R1", 2, "B", True), ("R2", 2, "A", False),
                   ("R4", 1, "B", False), ("R3", 1, "C", False)]


def test_lcr_parallel_mode_reads_capacitor_beside_resistor_hh_ch1():
    # Y = 1/R + jwC: the parallel view gives C exactly, whatever R is beside it
    b = Board("t", (Part("C1", "C", ("P", "0"), 1e-6, tolerance=Tolerance.symmetric(0.1)),
                    Part("R9", "R", ("P", "0"), 1e3)))
    j = _judge(b, "C1")
    lcr = next(a for a in j.advice if a.instrument == "lcr-meter")
    assert lcr.reliable and lcr.reading.quantity == "cp" and "parallel mode" in lcr.text
    assert lcr.reading.value == pytest.approx(1e-6, rel=1e-6)  # exact up to GMIN


def test_guard_net_named_for_divider_beside_resistor_common_practice():
    b = Board("t", (Part("R3", "R", ("A", "B"), 10e3), Part("R14", "R", ("A", "M"), 4.7e3),
                    Part("R15", "R", ("M", "B"), 10e3)))
    j = _judge(b, "R3")
    guarded = [a for a in j.advice if a.reading.guard is not None]
    assert len(guarded) == 1 and guarded[0].reading.guard == "M" and guarded[0].reliable
    assert guarded[0].reading.value == pytest.approx(10e3, rel=1e-6)
    assert not next(a for a in j.advice if a.instrument == "multimeter-low-ohms").reliable


def test_diode_test_beside_low_resistance_reads_the_resistor_kcl():
    # 1 mA into 100 ohm beside D1 gives 0.1 V, where a silicon junction carries
    # ~5e-13 A (Sze): the diode test reads 100 mV, not D1
    b = Board("t", (Part("D1", "D", ("A", "K"), model="DX"), Part("R1", "R", ("A", "K"), 100.0)), DX)
    j = _judge(b, "D1")
    meter = next(a for a in j.advice if a.instrument == "multimeter-low-ohms")
    assert meter.reading.value == pytest.approx(0.1, rel=1e-6) and not meter.reliable
