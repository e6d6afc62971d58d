"""The identification's decisions and its in-circuit readings.

References: parallel and series combination of resistors and capacitors,
RC decay: Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 1. Diode
equation I = Is (exp(V / (n Vt)) - 1): Sze, Physics of Semiconductor
Devices; Vt = k T / q with k and q from CODATA 2018 (exact SI values) at
SPICE's nominal 27 degC. The 2 s run time is common practice for such testers.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from incircuit.engines.base import StepResult
from incircuit.model import Board, Model, Part
from incircuit.predict import identify, predict, predict_between
from incircuit.tester.identify import run_identification
from incircuit.tester.profile import load_profile

PROFILE = load_profile()
VT = 1.380649e-23 * 300.15 / 1.602176634e-19  # CODATA 2018, 27 degC
SI_DIODE = Model("DSI", "D", {"is": 2.52e-9, "n": 1.752, "rs": 0.568})
ZENER = Model("DZ", "D", {"is": 1e-14, "n": 1.0, "rs": 1.0, "bv": 3.3, "ibv": 1e-3})
MODELS = {"DSI": SI_DIODE, "DZ": ZENER}


def _board(*parts: Part) -> Board:
    return Board("t", parts, MODELS)


def _within(reading, expected: float) -> bool:
    return abs(reading.value - expected) <= PROFILE.accuracy(reading)


# -- in circuit: combinations ---------------------------------------------------

def test_resistor_beside_resistor_reads_the_parallel_value():
    # Horowitz & Hill ch.1: R1 R2 / (R1 + R2)
    board = _board(Part("R1", "R", ("A", "B"), 10e3), Part("R2", "R", ("A", "B"), 4.7e3))
    pred = predict(board, "R1", trace_points=0)
    assert _within(pred.isolated.reading, 10e3)
    assert pred.in_circuit.reading.kind == "resistor"
    assert _within(pred.in_circuit.reading, 10e3 * 4.7e3 / 14.7e3)


def test_resistor_path_through_two_resistors_adds_in_parallel():
    # R1 beside R2 + R3 in series (through a floating net): R1 || (R2 + R3)
    board = _board(Part("R1", "R", ("A", "B"), 22e3), Part("R2", "R", ("A", "M"), 10e3),
                   Part("R3", "R", ("M", "B"), 12e3))
    reading = predict(board, "R1", trace_points=0).in_circuit.reading
    assert _within(reading, 22e3 * 22e3 / 44e3)


@pytest.mark.parametrize("c1,c2", [(100e-9, 220e-9), (10e-6, 22e-6), (1e-3, 2.2e-3)])
def test_capacitor_beside_capacitor_reads_the_sum(c1, c2):
    # Horowitz & Hill ch.1: parallel capacitances add
    board = _board(Part("C1", "C", ("A", "B"), c1), Part("C2", "C", ("A", "B"), c2))
    reading = predict(board, "C1", trace_points=0).in_circuit.reading
    assert reading.kind == "capacitor"
    assert _within(reading, c1 + c2)


@pytest.mark.parametrize("c1,c2", [(1e-6, 2.2e-6), (100e-9, 47e-9)])
def test_capacitors_in_series_read_product_over_sum(c1, c2):
    # Horowitz & Hill ch.1: series capacitances combine as C1 C2 / (C1 + C2)
    board = _board(Part("C1", "C", ("A", "M"), c1), Part("C2", "C", ("M", "B"), c2))
    reading = predict_between(board, "A", "B", trace_points=0).in_circuit.reading
    assert reading.kind == "capacitor"
    assert _within(reading, c1 * c2 / (c1 + c2))


@pytest.mark.parametrize("farads", [100e-9, 1e-6])
@pytest.mark.parametrize("anode_first", [True, False])
def test_silicon_diode_across_a_capacitor_reads_a_diode(farads, anode_first):
    pins = ("A", "B") if anode_first else ("B", "A")
    board = _board(Part("C1", "C", ("A", "B"), farads), Part("D1", "D", pins, model="DSI"))
    pred = predict(board, "C1", trace_points=0)
    assert pred.isolated.reading.kind == "capacitor"
    reading = pred.in_circuit.reading
    assert reading.kind == "diode"
    assert reading.extra["anode"] == (1 if anode_first else 2)
    assert 0.55 < reading.value < 0.8  # silicon at mA currents, common practice
    assert pred.kind_changes() and pred.difference() is None


# -- junctions --------------------------------------------------------------------

def _shockley_vf(loop_ohms: float, model: Model) -> float:
    """Junction voltage (without rs) in series with ``loop_ohms`` from the supply (Sze)."""
    vs, p = PROFILE.supply_volts, model.params
    nvt = p["n"] * VT

    def excess(i: float) -> float:
        return vs - i * (loop_ohms + p["rs"]) - nvt * math.log1p(i / p["is"])
    i = brentq(excess, 1e-15, vs / loop_ohms, xtol=1e-18, rtol=1e-14)
    return vs - i * loop_ohms


def test_diode_reads_its_shockley_forward_voltage_at_both_currents():
    # the low resistor gives ~6 mA, the high one ~10 uA; the engine's chords are low by at
    # most 0.163 n Vt between knots (its documented bound), the ADC floors by one count per probe
    reading = identify(_board(Part("D1", "D", ("A", "B"), model="DSI")), ("A", "B"), trace_points=0).reading
    assert reading.kind == "diode" and reading.extra["anode"] == 1
    p = PROFILE
    chord = 0.163 * SI_DIODE.params["n"] * VT
    tol = chord + 2 * reading.extra["resolution"]
    high_loop = p.port_high_ohms + p.probe_ohms(0, "low") + p.port_low_ohms
    low_loop = p.port_high_ohms + p.probe_ohms(0, "high") + p.port_low_ohms
    assert reading.value == pytest.approx(_shockley_vf(high_loop, SI_DIODE), abs=tol)
    assert reading.extra["vf_low_current"] == pytest.approx(_shockley_vf(low_loop, SI_DIODE), abs=tol)
    assert 5e-3 < reading.extra["current"] < 8e-3 and 5e-6 < reading.extra["low_current"] < 15e-6


def test_diode_orientation_and_no_reverse_conduction():
    reading = identify(_board(Part("D1", "D", ("B", "A"), model="DSI")), ("A", "B"), trace_points=0).reading
    assert reading.kind == "diode"
    assert (reading.extra["anode"], reading.extra["cathode"]) == (2, 1)
    assert "reverse_ohms" not in reading.extra


def test_anti_parallel_diodes_read_a_pair():
    board = _board(Part("D1", "D", ("A", "B"), model="DSI"), Part("D2", "D", ("B", "A"), model="DSI"))
    reading = identify(board, ("A", "B"), trace_points=0).reading
    assert reading.kind == "diode-pair"
    assert reading.extra["reverse_volts"] == pytest.approx(reading.value, abs=2 * reading.extra["resolution"])


def test_zener_reads_a_pair_with_its_breakdown_voltage():
    # a junction forward one way and a 3.3 V breakdown the other: V = bv + n Vt ln(I / ibv) + I rs
    reading = identify(_board(Part("D1", "D", ("A", "B"), model="DZ")), ("A", "B"), trace_points=0).reading
    assert reading.kind == "diode-pair"
    current = (PROFILE.supply_volts - 3.3) / (PROFILE.port_high_ohms + 680.0 + PROFILE.port_low_ohms)
    expected = 3.3 + VT * math.log(current / 1e-3) + current * 1.0
    assert reading.extra["reverse_volts"] == pytest.approx(expected, abs=0.02)  # chords + ADC counts


# -- other decisions --------------------------------------------------------------

def test_open_probes_read_nothing():
    board = _board(Part("R1", "R", ("A", "C"), 1e3), Part("R2", "R", ("B", "D"), 1e3))
    assert identify(board, ("A", "B"), trace_points=0).reading.kind == "nothing"


def test_above_the_resistance_range_reads_nothing():
    board = _board(Part("R1", "R", ("A", "B"), 10 * PROFILE.resistance_max_ohms))
    assert identify(board, ("A", "B"), trace_points=0).reading.kind == "nothing"


def test_inductor_with_dc_resistance():
    board = _board(Part("L1", "L", ("A", "B"), 10e-3, params={"dcr": 25.0}))
    reading = identify(board, ("A", "B"), trace_points=0).reading
    assert reading.kind == "inductor" and _within(reading, 10e-3)
    res = reading.extra["dc_resistance_resolution"]
    assert reading.extra["dc_resistance"] == pytest.approx(25.0, abs=0.01 * 25 + 2 * res)


def test_inductor_with_a_large_dc_resistance_reads_a_resistor():
    # beyond inductance.max_ohms the current rise is not timed: the part reads as its resistance
    board = _board(Part("L1", "L", ("A", "B"), 10e-3, params={"dcr": 5e3}))
    reading = identify(board, ("A", "B"), trace_points=0).reading
    assert reading.kind == "resistor" and _within(reading, 5e3)


def test_capacitor_esr_is_read():
    # series R-C: the step at the instant the current starts is I * ESR (Horowitz & Hill ch.1)
    board = _board(Part("C1", "C", ("A", "B"), 100e-6, params={"esr": 2.0}))
    reading = identify(board, ("A", "B"), trace_points=0).reading
    assert reading.kind == "capacitor" and _within(reading, 100e-6)
    assert reading.extra["esr"] == pytest.approx(2.0, abs=2 * reading.extra["esr_resolution"])


def test_self_discharge_of_a_leaky_capacitor():
    # RC decay V(t) = V0 exp(-t / RC) over the float time (Horowitz & Hill ch.1)
    r, c = 1e6, 1e-6
    board = _board(Part("C1", "C", ("A", "B"), c), Part("R1", "R", ("A", "B"), r))
    reading = identify(board, ("A", "B"), trace_points=0).reading
    assert reading.kind == "capacitor"
    expected = 1.0 - math.exp(-PROFILE.capacitance_self_discharge_seconds / (r * c))
    # two ADC readings of ~1.1 V, one count each of 1.1 V / 1024
    assert reading.extra["self_discharge"] == pytest.approx(expected, abs=3 * 1.1 / 1024 / 1.1)
    solid = identify(_board(Part("C1", "C", ("A", "B"), c)), ("A", "B"), trace_points=0).reading
    assert solid.extra["self_discharge"] < 0.002


@pytest.mark.parametrize("farads", [0.1e-6, 4.7e-3])
def test_whole_run_within_two_seconds(farads):
    # the usual run time of such testers is about 2 s (common practice)
    run = identify(_board(Part("C1", "C", ("A", "B"), farads)), ("A", "B"), trace_points=0)
    assert run.reading.kind == "capacitor"
    assert run.duration <= 2.0


class _ChargedSession:
    """A session whose probes stay at 3 V whatever the drive (a part that holds its charge)."""

    probe_nets = ("A", "B")

    def run(self, drive, duration, *, watch=None, sample_times=()):
        samples = np.full((len(sample_times), 2), 3.0)
        return StepResult(duration, False, (3.0, 3.0), samples, {"A": 3.0, "B": 3.0})


def test_a_part_that_cannot_be_discharged_is_unreadable():
    reading, steps = run_identification(_ChargedSession(), PROFILE, trace_points=0)
    assert reading.kind == "unreadable"
    assert steps and all(s.name.startswith("initial discharge") for s in steps)
    assert sum(s.result.duration for s in steps) <= PROFILE.discharge_timeout_seconds + 1e-9
