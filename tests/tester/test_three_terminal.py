"""Three probes: transistors identified, their pins found, gain and thresholds read.

References:
* Ebers-Moll (Ebers & Moll, Proc. IRE 42, 1954; Sze, Physics of
  Semiconductor Devices, 3rd ed., ch. 5): forward-active ``Ic = BF Ib``
  (Gummel-Poon with VAF = IKF = inf and no leakage reduces to it, ngspice
  manual, BJT model) and ``Vbe = NF Vt ln(1 + Ic/Is)``.
* Base current stolen by a base-emitter resistor (Kirchhoff's current law at
  the base, Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 2): the
  transistor gets ``Ib = (Vs - Vbe)/R_high - Vbe/R_BE`` of the drive, so
  the tester reads ``hFE' = BF (1 - Vbe / (R_BE Ib_drive))`` and none at
  all when ``Vbe/R_BE`` exceeds the drive.
* Square-law MOSFET (Sedra & Smith, Microelectronic Circuits, ch. 5; SPICE
  level 1 in the ngspice manual): ``Id = K/2 (Vgs - Vt)^2 (1 + lambda Vds)``,
  ``K = KP W/L``, so the gate voltage at drain current ``Id`` is
  ``Vt + sqrt(2 Id / (K (1 + lambda Vds)))``.
* JFET (ngspice manual, JFET model, Shichman-Hodges): ``Id = BETA (Vgs -
  VTO)^2`` in saturation, so ``Vgs = VTO + sqrt(Id / BETA)``.
* RC charge through a Thevenin source (Horowitz & Hill ch. 1).
"""

from __future__ import annotations

import math
from itertools import permutations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from incircuit.engines.ngspice import available
from incircuit.engines.pwl import VT, chord_error
from incircuit.model import Board, Model, Part
from incircuit.predict import identify
from incircuit.tester.profile import load_profile

PROFILE = load_profile()
CHORD = chord_error(math.sqrt(10.0)) * VT  # analytic chords: at most 4.2 mV low (n = 1)
R_HIGH = PROFILE.port_high_ohms + PROFILE.probe1_high_ohms
VS = PROFILE.supply_volts
NGSPICE = pytest.mark.skipif(available() is not None, reason=f"ngspice not available: {available()}")


def bjt_board(mtype: str = "NPN", bf: float = 150.0, *extra: Part) -> Board:
    model = Model("QX", mtype, {"is": 1e-14, "bf": bf, "br": 2.0})
    return Board("t", (Part("Q1", "Q", ("C", "B", "E"), model="QX"), *extra), {"QX": model})


def gain_tolerance(reading) -> float:
    # two ADC counts of the collector and base currents (the reading's own resolution)
    return 2 * reading.extra["resolution"]


@pytest.mark.parametrize("order", list(permutations("CBE")), ids="".join)
def test_npn_pins_found_in_every_placement(order):
    reading = identify(bjt_board(), order, trace_points=0).reading
    assert reading.kind == "bjt-npn"
    assert reading.extra["pins"] == {pin: order.index(pin) + 1 for pin in "BCE"}
    assert reading.value == pytest.approx(150.0, abs=gain_tolerance(reading))  # Ic = BF Ib
    exact = VT * math.log1p(reading.extra["ic"] / 1e-14)  # Vbe = Vt ln(1 + Ic/Is)
    lsb = PROFILE.adc_bandgap_volts / 2**PROFILE.adc_bits
    assert exact - CHORD - 2 * lsb <= reading.extra["vbe"] <= exact + 2 * lsb
    # BR = 2: about 19 uA in reverse, under the detection step or a gain near 2
    assert not reading.extra["saturated"] and reading.extra.get("reverse_gain", 0.0) < 3.0


@pytest.mark.parametrize("order", [("C", "B", "E"), ("E", "C", "B")], ids="".join)
def test_pnp_pins_and_gain(order):
    reading = identify(bjt_board("PNP", 80.0), order, trace_points=0).reading
    assert reading.kind == "bjt-pnp"
    assert reading.extra["pins"] == {pin: order.index(pin) + 1 for pin in "BCE"}
    assert reading.value == pytest.approx(80.0, abs=gain_tolerance(reading))


@settings(max_examples=6, deadline=None)
@given(r_be=st.floats(150e3, 5e6), bf=st.floats(30.0, 400.0))
def test_base_emitter_resistor_lowers_the_gain_by_the_stolen_current(r_be, bf):
    board = bjt_board("NPN", bf, Part("RBE", "R", ("B", "E"), r_be))
    reading = identify(board, ("C", "B", "E"), trace_points=0).reading
    assert reading.kind == "bjt-npn"
    ib, vbe = reading.extra["ib"], reading.extra["vbe"]
    expected = bf * (ib - vbe / r_be) / ib  # KCL at the base: R_BE takes Vbe / R_BE
    # the reading's resolution, plus one ADC count of Vbe in the stolen current
    lsb = PROFILE.adc_bandgap_volts / 2**PROFILE.adc_bits
    assert reading.value == pytest.approx(expected, abs=gain_tolerance(reading) + bf * lsb / r_be / ib)


def test_base_emitter_resistor_that_takes_all_the_drive_hides_the_forward_gain():
    # 47 kohm: Vbe / R_BE ~ 13 uA against (5 - 0.6) V / 470 kohm ~ 9.4 uA of drive:
    # no forward gain is left. What the tester still finds runs the other way:
    # with collector and emitter swapped, R_BE feeds the base-collector
    # junction and the transistor works in reverse.
    r_be = 47e3
    assert 0.6 / r_be > (VS - 0.6) / R_HIGH
    reading = identify(bjt_board("NPN", 150.0, Part("RBE", "R", ("B", "E"), r_be)),
                       ("C", "B", "E"), trace_points=0).reading
    forward = reading.kind == "bjt-npn" and reading.extra["pins"] == {"B": 2, "C": 1, "E": 3}
    assert not forward


def test_diode_pair_with_a_common_cathode():
    d = Model("DX", "D", {"is": 1e-14})
    board = Board("t", (Part("D1", "D", ("A", "K"), model="DX"), Part("D2", "D", ("B", "K"), model="DX")),
                  {"DX": d})
    reading = identify(board, ("A", "K", "B"), trace_points=0).reading
    assert reading.kind == "diode-pair" and reading.extra["common_cathode"] == 2
    for v in reading.extra["forward_volts"].values():  # Shockley at ~7 mA: 0.6-0.8 V (Sze)
        assert 0.6 < v < 0.8


def test_resistor_on_two_of_three_probes_reads_as_a_resistor():
    # probe 1 on a net with nothing across to the others: the two-terminal
    # identification between probes 2 and 3 (Ohm's law)
    board = Board("t", (Part("R1", "R", ("B", "C"), 10e3), Part("R2", "R", ("A", "X"), 1e3)))
    reading = identify(board, ("A", "B", "C"), trace_points=0).reading
    assert reading.kind == "resistor" and reading.extra["probes"] == [2, 3]
    assert reading.value == pytest.approx(10e3, abs=PROFILE.accuracy(reading))


def test_mosfet_on_the_analytic_engine_asks_for_ngspice():
    model = Model("MN", "NMOS", {"vto": 2.0, "kp": 0.5, "is": 1e-14})
    board = Board("t", (Part("M1", "M", ("D", "G", "S", "S"), model="MN"),), {"MN": model})
    reading = identify(board, ("D", "G", "S"), trace_points=0).reading
    assert reading.kind == "unreadable" and reading.extra["needs"] == "ngspice"
    assert "M1" in reading.extra["reason"]


def test_a_run_that_turns_a_channel_on_asks_for_ngspice():
    # the source reached through a resistor: the probes are not on M1's three
    # pins, but the steps charge its gate past vto with volts across the channel
    model = Model("MN", "NMOS", {"vto": 2.0, "kp": 0.5, "is": 1e-14})
    board = Board("t", (Part("M1", "M", ("D", "G", "S", "S"), model="MN"), Part("R1", "R", ("S", "X"), 1e3)),
                  {"MN": model})
    reading = identify(board, ("D", "G", "X"), trace_points=0).reading
    assert reading.kind == "unreadable" and reading.extra["needs"] == "ngspice"
    assert "past its threshold" in reading.extra["reason"]


# -- ngspice: MOSFET and JFET channels ------------------------------------------------

def mos_board(mtype: str, vto: float, *extra: Part) -> Board:
    model = Model("MX", mtype, {"vto": vto, "kp": 0.5, "lambda": 0.02, "is": 1e-14,
                                "cgso": 1e-6, "cgdo": 0.4e-6})
    return Board("t", (Part("M1", "M", ("D", "G", "S", "S"), model="MX", params={"w": 1e-3}), *extra),
                 {"MX": model})


def square_law_gate(reading, vt: float, kp: float = 0.5, lam: float = 0.02, vds: float = VS) -> float:
    # Vgs at the detected drain current (Sedra & Smith); W/L = 1e-3 / 100e-6
    k = kp * 10.0
    return math.copysign(abs(vt) + math.sqrt(2 * reading.extra["threshold_current"] / (k * (1 + lam * vds))), vt)


@NGSPICE
@pytest.mark.parametrize("mtype,vto,kind", [("NMOS", 2.0, "mosfet-n-enh"), ("PMOS", -2.0, "mosfet-p-enh")])
def test_enhancement_threshold_gate_capacitance_and_body_diode(mtype, vto, kind):
    reading = identify(mos_board(mtype, vto), ("S", "D", "G"), engine="ngspice", trace_points=0).reading
    assert reading.kind == kind
    assert reading.extra["pins"] == {"G": 3, "D": 2, "S": 1}
    # one ADC count of gate and source (4.9 mV) plus the drain voltage's effect on
    # lambda (under 1 mV): 10 mV
    assert reading.value == pytest.approx(square_law_gate(reading, vto), abs=0.01)
    # Cgs + Cgd = (cgso + cgdo) W = 1.4 nF (ngspice manual, level 1 overlap
    # capacitances; the probe stray cancels the zero offset), plus the Miller
    # charge Cgd dVd as the drain starts to move at the end of the charge
    # (Sedra & Smith ch. 10): over the time to threshold that reads as
    # Cgd dVd / ((Vs - Vth) ln(Vs / (Vs - Vth))) more. 1 %: timer tick and ADC.
    vth, drop = abs(reading.value), reading.extra["threshold_current"] * (PROFILE.port_high_ohms + 680.0)
    miller = 0.4e-9 * drop / ((VS - vth) * math.log(VS / (VS - vth)))
    assert reading.extra["gate_capacitance"] == pytest.approx(1.4e-9 + miller, rel=0.01)
    assert 0.5 < reading.extra["body_diode"] < 0.9  # silicon junction at ~7 mA (Sze)


@NGSPICE
def test_gate_source_resistor_slows_or_stops_the_gate_charge():
    # R_GS = 220 kohm: the gate stops at 5 V * 220k / (220k + 470k) = 1.6 V < Vt = 2 V
    stop = VS * 220e3 / (220e3 + R_HIGH)
    assert stop < 2.0
    board = mos_board("NMOS", 2.0, Part("RGS", "R", ("G", "S"), 220e3))
    reading = identify(board, ("D", "G", "S"), engine="ngspice", trace_points=0).reading
    assert not reading.kind.startswith("mosfet")
    # R_GS = 4.7 Mohm: the threshold is still reached, later: the gate charges
    # through the Thevenin source R_th = R || R_GS towards V_th = Vs R_GS / (R + R_GS),
    # t = R_th C ln(V_th / (V_th - Vg)) plus the Miller charge Cgd dVd at the end;
    # the tester, assuming the bare 470 kohm towards 5 V, reads
    # C' = t / (R ln(Vs / (Vs - Vg))) - offset
    r_gs = 4.7e6
    board = mos_board("NMOS", 2.0, Part("RGS", "R", ("G", "S"), r_gs))
    reading = identify(board, ("D", "G", "S"), engine="ngspice", trace_points=0).reading
    assert reading.kind == "mosfet-n-enh"
    vg = reading.value
    r_th, v_th = R_HIGH * r_gs / (R_HIGH + r_gs), VS * r_gs / (R_HIGH + r_gs)
    c = 1.4e-9 + PROFILE.port_stray_farads  # the gate's own charge plus the probe stray
    drop = reading.extra["threshold_current"] * (PROFILE.port_high_ohms + 680.0)
    t = r_th * c * math.log(v_th / (v_th - vg)) + r_th * 0.4e-9 * drop / (v_th - vg)
    seen = t / (R_HIGH * math.log(VS / (VS - vg))) - PROFILE.capacitance_zero_offset_farads
    assert reading.extra["gate_capacitance"] == pytest.approx(seen, rel=0.01)  # timer, ADC: as above


@NGSPICE
@pytest.mark.parametrize("mtype,kind", [("NJF", "jfet-n"), ("PJF", "jfet-p")])
def test_jfet_pinch_off(mtype, kind):
    model = Model("JX", mtype, {"vto": -2.0, "beta": 1e-3, "is": 1e-14})
    board = Board("t", (Part("J1", "J", ("D", "G", "S"), model="JX"),), {"JX": model})
    reading = identify(board, ("G", "S", "D"), engine="ngspice", trace_points=0).reading
    assert reading.kind == kind and reading.extra["pins"]["G"] == 1
    # Vgs = VTO + sqrt(Id / BETA) (N); mirrored for P; one ADC count of gate and source
    sign = 1.0 if mtype == "NJF" else -1.0
    expected = sign * (-2.0 + math.sqrt(reading.extra["threshold_current"] / 1e-3))
    assert reading.value == pytest.approx(expected, abs=0.01)


@NGSPICE
def test_depletion_mosfet_threshold():
    reading = identify(mos_board("NMOS", -1.5), ("D", "G", "S"), engine="ngspice", trace_points=0).reading
    assert reading.kind == "mosfet-n-dep" and reading.extra["pins"] == {"G": 2, "D": 1, "S": 3}
    # square law at the small pinch-off current, Vds ~ 5 V - |Vgs|
    vds = VS - abs(reading.value)
    assert reading.value == pytest.approx(square_law_gate(reading, -1.5, vds=vds), abs=0.01)
