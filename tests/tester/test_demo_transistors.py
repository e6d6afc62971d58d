"""The relay driver's Q1 (NPN) and M1 (N-MOSFET), alone and in circuit, on both engines.

References:
* Gummel-Poon static equations as ngspice implements them (ngspice manual,
  BJT model; Getreu, Modeling the Bipolar Transistor, 1976):
  ``Ic = (Ibe - Ibc)/qb - Ibc/BR``, ``Ib = Ibe/BF + ISE (e^{Vbe/(NE Vt)} - 1) + Ibc/BR``,
  ``qb = q1 (1 + sqrt(1 + 4 q2)) / 2``, ``q1 = 1 / (1 - Vbc/VAF)``,
  ``q2 = Ibe/IKF``, ``Ibe = IS (e^{Vbe/(NF Vt)} - 1)``; without VAF, IKF and
  leakage they reduce to Ebers-Moll, ``hFE = BF`` (Sze ch. 5).
* Square-law MOSFET (Sedra & Smith ch. 5): ``Vgs = Vt + sqrt(2 Id / (K (1 + lambda Vds)))``.
* Base current stolen by a base-emitter resistance, and the gate divider of a
  gate-source resistance (Kirchhoff, Thevenin: Horowitz & Hill 3rd ed. ch. 1-2).
"""

from __future__ import annotations

import math

import pytest

from incircuit.chips import apply_pin_roles
from incircuit.demo_boards import resolve_board
from incircuit.engines.ngspice import available
from incircuit.engines.pwl import VT
from incircuit.graph import equivalent_resistance
from incircuit.netlist import load
from incircuit.predict import identify
from incircuit.tester.profile import load_profile

PROFILE = load_profile()
VS = PROFILE.supply_volts
R_HIGH = PROFILE.port_high_ohms + PROFILE.probe2_high_ohms
NGSPICE = pytest.mark.skipif(available() is not None, reason=f"ngspice not available: {available()}")


@pytest.fixture(scope="module")
def board():
    path, pins = resolve_board("relay-driver")
    return apply_pin_roles(load(path), pins)


def gummel_poon_gain(params: dict, ic: float, vce: float) -> float:
    """hFE of the Gummel-Poon static model at collector current ``ic`` and ``vce``."""
    is_, bf, vaf, ikf = params["is"], params["bf"], params["vaf"], params["ikf"]
    ise, ne = params["ise"], params["ne"]
    x = ic  # Ibe, solved by fixed point from Ic = Ibe / qb (Ibc negligible, Vbc < 0)
    for _ in range(50):
        vbe = VT * math.log1p(x / is_)
        q1 = 1.0 / (1.0 - (vbe - vce) / vaf)
        qb = q1 * (1.0 + math.sqrt(1.0 + 4.0 * x / ikf)) / 2.0
        x = ic * qb
    vbe = VT * math.log1p(x / is_)
    ib = x / bf + ise * math.expm1(vbe / (ne * VT))
    return ic / ib


def test_q1_alone_reads_bf_on_the_analytic_engine(board):
    reading = identify(board.only("Q1"), board.part("Q1").pins, trace_points=0).reading
    assert reading.kind == "bjt-npn" and reading.extra["pins"] == {"B": 2, "C": 1, "E": 3}
    # Ebers-Moll: hFE = BF = 180; two counts of the reading's resolution
    assert reading.value == pytest.approx(180.0, abs=2 * reading.extra["resolution"])


@NGSPICE
def test_q1_alone_follows_gummel_poon_on_ngspice(board):
    reading = identify(board.only("Q1"), board.part("Q1").pins, engine="ngspice", trace_points=0).reading
    assert reading.kind == "bjt-npn" and reading.extra["pins"] == {"B": 2, "C": 1, "E": 3}
    expected = gummel_poon_gain(dict(board.models["QNSW"].params), reading.extra["ic"], reading.extra["vce"])
    # two counts of the reading's resolution (about 1 %); rb, re, rc drops are below 0.1 mV
    assert reading.value == pytest.approx(expected, abs=2 * reading.extra["resolution"])


@pytest.mark.parametrize("engine", [pytest.param("analytic"), pytest.param("ngspice", marks=[NGSPICE, pytest.mark.slow])])
def test_q1_in_circuit_loses_its_base_drive_to_rbe(board, engine):
    # RBE || (RB + RPD) between base and emitter takes Vbe / R_BE, more than the
    # (Vs - Vbe) / R_high the tester feeds the base: Q1 stays off, two junctions remain
    r_be = equivalent_resistance(board, "Q1_B", "0", without=["Q1"])
    assert r_be == pytest.approx(47e3 * 104.7e3 / (47e3 + 104.7e3), rel=1e-6)  # parallel, H&H ch. 1
    assert 0.6 / r_be > (VS - 0.6) / R_HIGH
    reading = identify(board, board.part("Q1").pins, engine=engine, trace_points=0).reading
    assert reading.kind == "diode-pair" and reading.extra["common_anode"] == 2


def test_m1_needs_ngspice_on_the_analytic_engine(board):
    for b in (board.only("M1"), board):
        reading = identify(b, board.part("M1").pins[:3], trace_points=0).reading
        assert reading.kind == "unreadable" and reading.extra["needs"] == "ngspice"


@NGSPICE
@pytest.mark.slow
def test_m1_alone_and_in_circuit_on_ngspice(board):
    pins = board.part("M1").pins[:3]
    reading = identify(board.only("M1"), pins, engine="ngspice", trace_points=0).reading
    assert reading.kind == "mosfet-n-enh" and reading.extra["pins"] == {"G": 2, "D": 1, "S": 3}
    # MNSW: vto 1.6, kp 8 (W = L: K = 8), lambda 0.01; one ADC count
    k, vds = 8.0, VS - reading.extra["threshold_current"] * 702.0
    expected = 1.6 + math.sqrt(2 * reading.extra["threshold_current"] / (k * (1 + 0.01 * vds)))
    assert reading.value == pytest.approx(expected, abs=0.005)
    # (cgso + cgdo) W with SPICE's default W = 100 um: 330 pF, plus the Miller charge of
    # Cgd (80 pF) over the 0.18 V drain drop; 2 %: timer and ADC at this small size
    vth, drop = reading.value, reading.extra["threshold_current"] * 702.0
    miller = 80e-12 * drop / ((VS - vth) * math.log(VS / (VS - vth)))
    assert reading.extra["gate_capacitance"] == pytest.approx(330e-12 + miller, rel=0.02)
    # in circuit RGS makes the gate drive a divider below the threshold: no channel
    stop = VS * 100e3 / (100e3 + R_HIGH)
    assert stop < 1.6
    reading = identify(board, pins, engine="ngspice", trace_points=0).reading
    assert not reading.kind.startswith("mosfet")
