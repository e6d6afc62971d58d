"""Transistor junctions seen by the analytic engine.

Each junction is a diode following the Shockley equation (Sze, Physics of
Semiconductor Devices) with the SPICE model's saturation current and
emission coefficient (ngspice manual: BJT is/nf/nr, MOSFET bulk junction is,
JFET gate junction is/n); the tolerance is the documented chord bound. A
bipolar junction with the third pin floating follows the Ebers-Moll
transport model (Ebers & Moll 1954; Sze ch. 5): with the collector open,
``Ic = 0`` gives ``Ie = Is (1/(1 + BR) + 1/BF) (exp(Vbe / (NF Vt)) - 1)``.
"""

from __future__ import annotations

import math

import pytest

from incircuit.engines import get_engine
from incircuit.engines.base import Source, Watch
from incircuit.engines.pwl import VT, chord_error, shockley_voltage
from incircuit.model import Board, Model, Part

ENGINE = get_engine("analytic")
LOW = Source(1e-3, 0.0)
Q2 = math.sqrt(10.0)


def forward(board: Board, plus: str, minus: str, r: float = 4.7e3, vs: float = 5.0):
    """(junction voltage, current) with ``plus`` driven through r, ``minus`` low."""
    s = ENGINE.open(board, (plus, minus), 30e-12)
    res = s.run((Source(r, vs), LOW), 0.01)
    return res.volts[0] - res.volts[1], (vs - res.volts[0]) / r


def assert_shockley(v, i, is_, n):
    exact = shockley_voltage(i, is_, n)
    assert exact - chord_error(Q2) * n * VT - 1e-6 <= v <= exact + 1e-6


@pytest.mark.parametrize("mtype", ["NPN", "PNP"])
def test_bjt_junctions(mtype):
    bf, br = 100.0, 1.0  # SPICE defaults (ngspice manual, BJT model)
    model = Model("QX", mtype, {"is": 1e-15, "nf": 1.0, "nr": 1.2})
    b = Board("t", (Part("Q1", "Q", ("C", "B", "E"), model="QX"),), {"QX": model})
    sign = 1 if mtype == "NPN" else -1
    base_plus = ("B", "E") if sign > 0 else ("E", "B")
    v, i = forward(b, *base_plus)  # collector open: Ebers-Moll, see the module text
    assert_shockley(v, i, 1e-15 * (1 / (1 + br) + 1 / bf), 1.0)
    v, i = forward(b, *(("B", "C") if sign > 0 else ("C", "B")))
    assert_shockley(v, i, 1e-15 * (1 / (1 + bf) + 1 / br), 1.2)
    # the opposite polarity blocks; collector-emitter blocks both ways with
    # the base open (only the junctions' leakage, amplified)
    v, i = forward(b, *base_plus[::-1])
    assert i == pytest.approx(0.0, abs=1e-9)
    v, i = forward(b, "C", "E")
    assert i == pytest.approx(0.0, abs=1e-6)


def test_mosfet_body_diode_and_open_gate():
    nmos = Model("MN", "NMOS", {"is": 1e-14})
    b = Board("t", (Part("M1", "M", ("D", "G", "S", "S"), model="MN"),), {"MN": nmos})
    v, i = forward(b, "S", "D")  # body diode: bulk (= source) to drain
    assert_shockley(v, i, 1e-14, 1.0)
    v, i = forward(b, "D", "S")
    assert i == pytest.approx(0.0, abs=1e-9)
    v, i = forward(b, "G", "S")  # no gate capacitance given: the gate is open
    assert i == pytest.approx(0.0, abs=1e-9)
    pmos = Model("MP", "PMOS", {"is": 1e-14})
    b = Board("t", (Part("M1", "M", ("D", "G", "S", "S"), model="MP"),), {"MP": pmos})
    v, i = forward(b, "D", "S")  # P channel: drain to bulk
    assert_shockley(v, i, 1e-14, 1.0)


def test_mosfet_gate_overlap_capacitance():
    # cgso, cgdo are per metre of channel width (ngspice manual, MOSFET level 1);
    # C = (cgso + cgdo) W with drain and source tied: RC charge time to 63 %
    # t = RC (Horowitz & Hill 3rd ed. ch. 1)
    model = Model("MN", "NMOS", {"is": 1e-14, "cgso": 2e-9, "cgdo": 1e-9})
    b = Board("t", (Part("M1", "M", ("S", "G", "S", "S"), model="MN", params={"w": 1e-3}),), {"MN": model})
    s = ENGINE.open(b, ("G", "S"), 0.0)
    r = 100e3
    res = s.run((Source(r, 5.0), LOW), 1.0, watch=Watch(0, 5 * (1 - math.exp(-1)), minus=1))
    assert res.duration == pytest.approx((r + 1e-3) * 3e-12, rel=1e-6)


@pytest.mark.parametrize("mtype", ["NJF", "PJF"])
def test_jfet_gate_junctions(mtype):
    model = Model("JX", mtype, {"is": 1e-14, "n": 1.0})
    b = Board("t", (Part("J1", "J", ("D", "G", "S"), model="JX"),), {"JX": model})
    pair = ("G", "S") if mtype == "NJF" else ("S", "G")
    v, i = forward(b, *pair)
    assert_shockley(v, i, 1e-14, 1.0)
    v, i = forward(b, *pair[::-1])
    assert i == pytest.approx(0.0, abs=1e-9)
