"""Bench instruments on whole boards, against closed forms.

Sources: complex impedance of R, C, L and their series/parallel combination,
Horowitz & Hill, *The Art of Electronics*, 3rd ed., ch. 1 (H&H); coupled
coils, Alexander & Sadiku, *Fundamentals of Electric Circuits*, 5th ed.,
ch. 13 (A&S); diode equation, Sze, *Physics of Semiconductor Devices* (Sze);
SPICE model defaults, ngspice user manual.
"""

from __future__ import annotations

import math

import pytest

from incircuit.bench import (
    Equivalents, Network, bench_profiles, channels, diode_drop, impedance, junctions, lcr_reading,
    load_bench_profile, ohms,
)
from incircuit.bench.junctions import THERMAL_VOLTAGE, elements
from incircuit.errors import ProfileError
from incircuit.model import Board, Model, Part

# Linear solves of a few nodes: round-off only, plus GMIN (1e-12 S) against
# impedances of at most ~1 Mohm -> relative error below 1e-6.
RTOL_LINEAR = 1e-6

LCR = next(p for p in bench_profiles() if p.kind == "lcr")
METER = next(p for p in bench_profiles() if p.kind == "multimeter")
DX = {"DX": Model("DX", "D", {"is": 1e-14, "n": 1.0})}


def _w(f: float) -> float:
    return 2 * math.pi * f


@pytest.mark.parametrize("f", LCR.frequencies)
def test_series_rc_impedance_hh_ch1(f):
    # Z = R + 1/(jwC) (H&H ch.1); series view gives R and C back exactly
    r, c = 220.0, 47e-9
    b = Board("t", (Part("R1", "R", ("A", "M"), r), Part("C1", "C", ("M", "B"), c)))
    eq, _ = impedance(b, "A", "B", LCR, f)
    expected = r + 1 / (1j * _w(f) * c)
    assert eq.z == pytest.approx(expected, rel=RTOL_LINEAR)
    assert eq.rs == pytest.approx(r, rel=RTOL_LINEAR)
    assert eq.cs == pytest.approx(c, rel=RTOL_LINEAR)
    d = _w(f) * r * c  # D = w Rs Cs for a series RC
    assert eq.d == pytest.approx(d, rel=RTOL_LINEAR)
    # parallel view of the same impedance: Cp = Cs/(1+D^2), Rp = Rs(1+1/D^2),
    # from Y = 1/Z (H&H ch.1 complex algebra)
    assert eq.cp == pytest.approx(c / (1 + d * d), rel=RTOL_LINEAR)
    assert eq.rp == pytest.approx(r * (1 + 1 / (d * d)), rel=RTOL_LINEAR)


@pytest.mark.parametrize("f", LCR.frequencies)
def test_parallel_rc_reads_c_in_parallel_mode_hh_ch1(f):
    # Z = R || 1/(jwC) = R / (1 + jwRC) (H&H ch.1): the parallel view gives R, C
    r, c = 10e3, 100e-9
    b = Board("t", (Part("R1", "R", ("A", "B"), r), Part("C1", "C", ("A", "B"), c)))
    eq, _ = impedance(b, "A", "B", LCR, f)
    assert eq.z == pytest.approx(r / (1 + 1j * _w(f) * r * c), rel=RTOL_LINEAR)
    assert eq.cp == pytest.approx(c, rel=RTOL_LINEAR)
    assert eq.rp == pytest.approx(r, rel=RTOL_LINEAR)
    assert eq.d == pytest.approx(1 / (_w(f) * r * c), rel=RTOL_LINEAR)


@pytest.mark.parametrize("f", LCR.frequencies)
def test_series_and_parallel_rl_hh_ch1(f):
    r, l = 3.3, 220e-6
    series = Board("s", (Part("R1", "R", ("A", "M"), r), Part("L1", "L", ("M", "B"), l)))
    eq, _ = impedance(series, "A", "B", LCR, f)
    assert eq.z == pytest.approx(r + 1j * _w(f) * l, rel=RTOL_LINEAR)  # Z = R + jwL
    assert (eq.rs, eq.ls) == (pytest.approx(r, rel=RTOL_LINEAR), pytest.approx(l, rel=RTOL_LINEAR))
    assert eq.q == pytest.approx(_w(f) * l / r, rel=RTOL_LINEAR)  # Q = wL/R
    par = Board("p", (Part("R1", "R", ("A", "B"), 1e3), Part("L1", "L", ("A", "B"), l)))
    eq, _ = impedance(par, "A", "B", LCR, f)
    assert (eq.rp, eq.lp) == (pytest.approx(1e3, rel=RTOL_LINEAR), pytest.approx(l, rel=RTOL_LINEAR))


def test_lc_ladder_by_series_parallel_reduction_hh_ch1():
    # R1 - (C1 || (R2 - (C2 || R3))): reduced by hand with the H&H ch.1 rules
    f = 1e3
    w = _w(f)
    r1, c1, r2, c2, r3 = 100.0, 1e-6, 470.0, 220e-9, 2.2e3
    b = Board("t", (Part("R1", "R", ("A", "N1"), r1), Part("C1", "C", ("N1", "B"), c1),
                    Part("R2", "R", ("N1", "N2"), r2), Part("C2", "C", ("N2", "B"), c2),
                    Part("R3", "R", ("N2", "B"), r3)))

    def par(x: complex, y: complex) -> complex:
        return x * y / (x + y)

    z_inner = r2 + par(1 / (1j * w * c2), r3)
    expected = r1 + par(1 / (1j * w * c1), z_inner)
    assert Network(b, w).impedance("A", "B") == pytest.approx(expected, rel=RTOL_LINEAR)


@pytest.mark.parametrize("k", [0.0, 0.5, 0.99])
def test_coupled_coils_shorted_secondary_as_ch13(k):
    # input impedance with the secondary shorted: jw L1 (1 - k^2) (A&S ch.13)
    l1, l2, f = 1e-3, 4e-3, 1e3
    parts = (Part("L1", "L", ("A", "B"), l1), Part("L2", "L", ("S", "S2"), l2),
             Part("R9", "R", ("S", "S2"), 0.0),
             Part("K1", "K", (), k, params={"inductors": ("L1", "L2")}))
    z = Network(Board("t", parts), _w(f)).impedance("A", "B")
    assert z == pytest.approx(1j * _w(f) * l1 * (1 - k * k), rel=RTOL_LINEAR)


def test_guard_removes_path_beside_three_wire_measurement():
    # 10 kohm beside 100 + 100 ohm: guarding the middle net leaves only the
    # part's current in the measured lead (three-terminal guarded measurement,
    # common practice); unguarded it is 10k || 200 (H&H ch.1)
    b = Board("t", (Part("R1", "R", ("A", "B"), 10e3), Part("R2", "R", ("A", "G"), 100.0),
                    Part("R3", "R", ("G", "B"), 100.0)))
    net = Network(b, _w(1e3))
    assert net.impedance("A", "B").real == pytest.approx(10e3 * 200 / 10200, rel=RTOL_LINEAR)
    assert net.impedance("A", "B", guard="G").real == pytest.approx(10e3, rel=RTOL_LINEAR)


def test_multimeter_keeps_diode_beside_resistor_off():
    # R1 between A and B, D1 from A to C, R2 from C to B. At <= 0.2 V a
    # silicon junction carries Is*exp(0.2/Vt) ~ 2e-11 A (Sze): R1 alone is read.
    b = Board("t", (Part("R1", "R", ("A", "B"), 10e3), Part("D1", "D", ("A", "C"), model="DX"),
                    Part("R2", "R", ("C", "B"), 100.0)), DX)
    for a, k in (("A", "B"), ("B", "A")):
        r = ohms(b, a, k, METER)
        # 1e-4: the junction's leakage of ~1e-10 A against 10 uA of test current
        assert r.value == pytest.approx(10e3, rel=1e-4)
        assert max(r.junctions.values()) < 1e-9


def test_multimeter_range_and_accuracy_from_profile():
    b = Board("t", (Part("R1", "R", ("A", "B"), 4.7e3),))
    r = ohms(b, "A", "B", METER)
    assert r.value == pytest.approx(4.7e3, rel=RTOL_LINEAR)  # Ohm's law
    rng = next(x for x in METER.ranges if x.full_scale == 2e4)
    assert r.setting == "20 kohm range"
    assert r.accuracy == pytest.approx(METER.relative * 4.7e3 + METER.counts * rng.full_scale
                                       / METER.display_counts, rel=1e-12)
    nothing = ohms(Board("t", (Part("R1", "R", ("A", "B"), 1e9),)), "A", "B", METER)
    assert nothing.value is None and "over range" in nothing.describe()


def test_diode_test_reads_shockley_forward_voltage_sze():
    # V = n Vt ln(I/Is + 1) (Sze), Vt = kT/q at 300.15 K
    models = {"DX": Model("DX", "D", {"is": 2.5e-9, "n": 1.75})}
    b = Board("t", (Part("D1", "D", ("A", "K"), model="DX"),), models)
    r = diode_drop(b, "A", "K", METER)
    expected = 1.75 * THERMAL_VOLTAGE * math.log(METER.diode_current / 2.5e-9 + 1)
    assert r.value == pytest.approx(expected, rel=1e-6)  # Newton stops at 1e-9 V
    assert diode_drop(b, "K", "A", METER).value is None  # reverse: over range


def test_diode_test_with_resistor_beside_the_diode_kcl():
    # 1 mA splits between D1 and 1 kohm: I = V/R + Is(exp(V/Vt)-1) (KCL, Sze)
    b = Board("t", (Part("D1", "D", ("A", "K"), model="DX"), Part("R1", "R", ("A", "K"), 1e3)), DX)
    v = diode_drop(b, "A", "K", METER).value
    total = v / 1e3 + 1e-14 * math.expm1(v / THERMAL_VOLTAGE)
    assert total == pytest.approx(METER.diode_current, rel=1e-6)


def test_lcr_reports_junction_peak_at_test_level():
    # a diode right across the probes sees the meter's level (0.5 V rms through
    # 100 ohm into a near-open junction): peak = sqrt(2) * 0.5 V
    b = Board("t", (Part("D1", "D", ("A", "K"), model="DX"),), DX)
    _, peaks = impedance(b, "A", "K", LCR, 1e3)
    assert peaks["D1"] == pytest.approx(math.sqrt(2) * LCR.level_volts, rel=1e-6)


def test_lcr_reading_accuracy_grows_with_dissipation():
    eq = Equivalents.of(complex(10.0, -1.0 / (_w(1e3) * 1e-6)), 1e3)
    r = lcr_reading(eq, "cs", LCR)
    assert r.value == pytest.approx(1e-6, rel=1e-12)
    expected_rel = LCR.basic * (1 + LCR.short_ohms / abs(eq.z) + abs(eq.z) * _w(1e3) * LCR.open_farads) \
        * math.sqrt(1 + eq.d ** 2)
    assert r.accuracy == pytest.approx(1e-6 * expected_rel, rel=1e-12)
    assert r.setting == "1 kHz, series mode"


def test_junctions_and_channels_from_spice_defaults():
    models = {"QN": Model("QN", "NPN", {}), "QP": Model("QP", "PNP", {"is": 1e-15}),
              "JN": Model("JN", "NJF", {"beta": 1e-3, "vto": -1.5}),
              "MD": Model("MD", "NMOS", {"vto": -1.0, "kp": 1e-4})}
    b = Board("t", (Part("Q1", "Q", ("C", "B", "E"), model="QN"),
                    Part("Q2", "Q", ("C", "B", "E"), model="QP"),
                    Part("J1", "J", ("D", "G", "S"), model="JN"),
                    Part("M1", "M", ("D", "G", "S", "S"), model="MD")), models)
    js = {j.name: j for j in junctions(elements(b))}
    assert (js["Q1 B-E"].anode, js["Q1 B-E"].cathode, js["Q1 B-E"].saturation) == ("B", "E", 1e-16)
    assert (js["Q2 B-C"].anode, js["Q2 B-C"].cathode) == ("C", "B")
    assert (js["J1 G-S"].anode, js["J1 G-S"].cathode) == ("G", "S")
    assert "M1 body B-S" not in js and js["M1 body B-D"].anode == "S"
    ch = {c.name: c.conductance for c in channels(elements(b))}
    # Shichman-Hodges linear region at Vds -> 0 (ngspice manual): gds = 2 beta |Vto|,
    # level-1 MOSFET gds = KP W/L |Vto - 0| with W = L = 100 um by default
    assert ch["J1 channel"] == pytest.approx(2 * 1e-3 * 1.5, rel=1e-12)
    assert ch["M1 channel"] == pytest.approx(1e-4 * 1.0, rel=1e-12)


def test_profiles_shipped_and_bad_profile_names_file_and_line(tmp_path):
    assert {p.kind for p in bench_profiles()} == {"multimeter", "lcr"}
    bad = tmp_path / "bad.toml"
    bad.write_text('[instrument]\nkind = "lcr"\n[lcr]\nfrequencies = [1e3]\nlevel_volts = -1\n')
    with pytest.raises(ProfileError) as err:
        load_bench_profile(str(bad))
    assert str(err.value).startswith(f"{bad}:5: 'level_volts'")
    broken = tmp_path / "broken.toml"
    broken.write_text("[instrument\nkind = 1\n")
    with pytest.raises(ProfileError) as err:
        load_bench_profile(str(broken))
    assert f"{broken}:1:" in str(err.value)
