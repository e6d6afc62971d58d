"""Verdicts, reasons and lift plans for transistors in circuit.

References: base current stolen by a base-emitter resistance and the gate
divider of a gate-source resistance (Kirchhoff's current law and Thevenin's
theorem, Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 1-2);
Ebers-Moll forward gain ``hFE = BF`` (Sze, Physics of Semiconductor Devices,
ch. 5).
"""

from __future__ import annotations

import pytest

from incircuit.engines.ngspice import available
from incircuit.judge import judge
from incircuit.judge.transistor import gate_divider, stolen_base_current
from incircuit.model import Board, Model, Part
from incircuit.predict import predict
from incircuit.tester.profile import load_profile

PROFILE = load_profile()
VS = PROFILE.supply_volts
R_HIGH = PROFILE.port_high_ohms + PROFILE.probe2_high_ohms
NPN = Model("QN", "NPN", {"is": 1e-14, "bf": 150.0, "br": 2.0})


def stage(r_be: float) -> Board:
    """A common-emitter switch: base resistor from the driver, R_BE, collector load."""
    return Board("t", (Part("Q1", "Q", ("C", "B", "E"), model="QN"), Part("RBE", "R", ("B", "E"), r_be),
                       Part("RC", "R", ("V", "C"), 1e3), Part("RB", "R", ("IN", "B"), 10e3)), {"QN": NPN})


def judged(board: Board, part: str, engine: str = "analytic"):
    pred = predict(board, part, engine=engine, trace_points=0)
    return pred, judge(board, part, pred, PROFILE, engine)


def test_a_base_emitter_resistor_that_takes_part_of_the_drive_lowers_the_gain():
    pred, j = judged(stage(470e3), "Q1")
    iso, inc = pred.isolated.reading, pred.in_circuit.reading
    assert iso.kind == inc.kind == "bjt-npn"
    stolen, drive = stolen_base_current(iso.extra["vbe"], 470e3, VS, R_HIGH)
    # the closed form explains the in-circuit gain: hFE (1 - stolen / drive), within
    # 2 % (the Vbe in circuit is a few mV lower than alone, plus two counts of resolution)
    assert inc.value == pytest.approx(iso.value * (1 - stolen / drive), rel=0.02)
    assert j.verdict == "predictable"
    assert any("Vbe / R_BE" in r and "gain reads about" in r for r in j.reasons)
    # bf changes move the in-circuit gain almost as much as the part's own
    assert j.sensitivity.what == "bf" and j.sensitivity.value == pytest.approx(1.0, abs=0.1)
    assert j.lift[0].verdict == "reliable"


def test_a_base_emitter_resistor_that_takes_all_the_drive_masks_the_transistor():
    r_be = 47e3
    stolen, drive = stolen_base_current(0.6, r_be, VS, R_HIGH)
    assert stolen > drive
    pred, j = judged(stage(r_be), "Q1")
    assert j.verdict == "masked"
    assert any("none is left for Q1" in r for r in j.reasons)
    # what the tester still finds is the transistor run backwards (C and E swapped):
    # a transistor whose pins come out differently cannot be judged
    assert pred.in_circuit.reading.extra["pins"] != pred.isolated.reading.extra["pins"]
    assert "finds the pins as" in j.reasons[0]
    # lifting the base or emitter leg, or R_BE, gives the part's own reading back
    best = j.lift[0]
    assert best.verdict == "reliable" and best.reading.value == pytest.approx(pred.isolated.reading.value,
                                                                             rel=0.01)


@pytest.mark.skipif(available() is not None, reason=f"ngspice not available: {available()}")
def test_a_gate_source_resistor_below_the_threshold_masks_the_mosfet():
    model = Model("MN", "NMOS", {"vto": 2.0, "kp": 0.5, "is": 1e-14, "cgso": 1e-6, "cgdo": 0.4e-6})
    board = Board("t", (Part("M1", "M", ("D", "G", "S", "S"), model="MN", params={"w": 1e-3}),
                        Part("RGS", "R", ("G", "S"), 100e3), Part("RD", "R", ("V", "D"), 100.0)), {"MN": model})
    v_end, _ = gate_divider(100e3, VS, R_HIGH)
    assert v_end < 2.0
    pred, j = judged(board, "M1", "ngspice")
    assert pred.isolated.reading.kind == "mosfet-n-enh"
    assert j.verdict == "masked"
    assert any("never turns on" in r for r in j.reasons)
    assert j.sensitivity.what == "vto"
    assert any(x.verdict == "reliable" for x in j.lift)


def test_no_verdict_of_reliable_when_the_engine_cannot_read_the_part():
    # the analytic engine leaves MOSFET channels out: its "needs ngspice" answer
    # must not pass for a reading that judges the part
    model = Model("MN", "NMOS", {"vto": 2.0, "kp": 0.5, "is": 1e-14})
    board = Board("t", (Part("M1", "M", ("D", "G", "S", "S"), model="MN"), Part("RGS", "R", ("G", "S"), 1e6)),
                  {"MN": model})
    pred, j = judged(board, "M1")
    assert pred.in_circuit.reading.extra["needs"] == "ngspice"
    assert j.verdict == "masked" and "--engine ngspice" in j.reasons[0]
