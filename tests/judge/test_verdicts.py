"""Verdicts, sensitivity, reasons and fault detectability on hand-analysed boards.

Sources: parallel and series combination of resistors and capacitors,
Horowitz & Hill, *The Art of Electronics*, 3rd ed., ch. 1 (H&H). For a part
R beside a resistance Rp the reading is R*Rp/(R+Rp); differentiating,
S = d ln(R||Rp) / d ln R = Rp/(R+Rp). For twin capacitors C1 + C2 the
reading is the sum and S = C1/(C1+C2). Diode equation: Sze, *Physics of
Semiconductor Devices*. Junctions conducting under a few volts of drive:
common practice.
"""

from __future__ import annotations

import json
import math

import pytest

from incircuit.model import Board, Model, Part, Tolerance
from incircuit.predict import predict
from incircuit.tester.profile import load_profile

from incircuit.judge import judge

PROFILE = load_profile()
DX = {"DX": Model("DX", "D", {"is": 1e-14, "n": 1.0})}
# The simulated tester reads a resistor to about 0.3 % (divider method with a
# 10-bit converter and port resistances); S from a +/-10 % difference of such
# readings is good to a few hundredths.
S_ATOL = 0.03


def _judge(board: Board, part: str, **kw):
    prediction = predict(board, part, profile=PROFILE)
    return judge(board, part, prediction, PROFILE, "analytic", **kw)


def _beside(rp: float) -> Board:
    return Board("t", (Part("R1", "R", ("A", "B"), 10e3, tolerance=Tolerance.symmetric(0.05)),
                       Part("R2", "R", ("A", "B"), rp)))


def test_10k_beside_100_ohm_is_masked_hh_ch1():
    j = _judge(_beside(100.0), "R1")
    assert j.verdict == "masked"
    assert j.sensitivity.value == pytest.approx(100 / 10100, abs=S_ATOL)  # S = Rp/(R+Rp)
    # open, x0.5 and x2 move 99 ohm by under 1 %: inside the healthy band
    shown = {f.fault.kind: f.detectable for f in j.faults}
    assert shown == {"open": False, "short": True, "low": False, "high": False}


def test_10k_beside_10_megohm_is_reliable_hh_ch1():
    j = _judge(_beside(10e6), "R1")
    assert j.verdict == "reliable"
    assert j.sensitivity.value == pytest.approx(10e6 / (10e6 + 10e3), abs=S_ATOL)
    assert all(f.detectable for f in j.faults)


def test_series_path_beside_is_predictable_and_named_hh_ch1():
    # R14 + R15 = 14.7 kohm beside R3: reading 10k || 14.7k = 5.95 kohm, S = 14.7/24.7
    b = Board("t", (Part("R3", "R", ("A", "B"), 10e3), Part("R14", "R", ("A", "M"), 4.7e3),
                    Part("R15", "R", ("M", "B"), 10e3)))
    j = _judge(b, "R3")
    assert j.verdict == "predictable"
    assert j.sensitivity.value == pytest.approx(14.7 / 24.7, abs=S_ATOL)
    text = " ".join(j.reasons)
    assert "R14 (4.7 kohm) and R15 (10 kohm) in series form a 14.7 kohm path beside R3" in text
    assert "(41 % low)" in text or "(40 % low)" in text  # 1 - 5.95/10 = 0.405
    faults = {f.fault.kind: f for f in j.faults}
    # open leaves the 14.7 kohm path alone (H&H ch.1), rtol: tester's ~0.5 % divider accuracy
    assert faults["open"].reading.value == pytest.approx(14.7e3, rel=0.01)
    assert all(f.detectable for f in j.faults)


def test_twin_capacitors_on_one_net_read_their_sum_hh_ch1():
    b = Board("t", (Part("C8", "C", ("+12V", "0"), 100e-6), Part("C9", "C", ("+12V", "0"), 100e-6)))
    j = _judge(b, "C8")
    assert j.verdict == "predictable"
    prediction = predict(b, "C8", profile=PROFILE)
    # parallel capacitances add; rtol 3 %: the tester's stated capacitance accuracy
    assert prediction.in_circuit.reading.value == pytest.approx(200e-6, rel=0.03)
    assert j.sensitivity.value == pytest.approx(0.5, abs=S_ATOL)  # S = C1/(C1+C2)
    assert "C9 (100 uF) shares nets +12V and 0 with C8: the reading is their sum (200 uF)" in j.reasons
    faults = {f.fault.kind: f.detectable for f in j.faults}
    # C9 bypasses C8's series resistance: a high ESR of C8 cannot show (H&H ch.1)
    assert faults["esr"] is False
    assert faults["open"] and faults["short"] and faults["low"] and faults["high"]


def test_diode_beside_resistor_turns_reading_into_junction_common_practice():
    # R1 between A and B, D1 from A to C, R2 from C to B: the tester's 5 V drive
    # through ~700 ohm turns D1 on; a low-voltage multimeter keeps it off
    b = Board("t", (Part("R1", "R", ("A", "B"), 10e3), Part("D1", "D", ("A", "C"), model="DX"),
                    Part("R2", "R", ("C", "B"), 100.0)), DX)
    j = _judge(b, "R1")
    assert j.verdict == "masked"
    assert any(r.startswith("D1 conducts at about 0.") and "the reading becomes a junction" in r
               for r in j.reasons)
    meter = next(a for a in j.advice if a.instrument == "multimeter-low-ohms")
    assert meter.reliable and meter.reading.value == pytest.approx(10e3, rel=1e-4)
    lcr = next(a for a in j.advice if a.instrument == "lcr-meter")
    assert not lcr.reliable and "past its turn-on" in lcr.text


def test_resistor_share_of_probe_current_kcl():
    # 10 kohm beside 14.7 kohm: R3 carries 14.7/24.7 = 60 % of the current (current divider, H&H ch.1)
    b = Board("t", (Part("R3", "R", ("A", "B"), 10e3), Part("R14", "R", ("A", "M"), 4.7e3),
                    Part("R15", "R", ("M", "B"), 10e3)))
    j = _judge(b, "R3")
    assert any(r.startswith("R3 carries 60 % of the") for r in j.reasons)


def _forward_volts(i_s: float, r_beside: float | None) -> float:
    """Solve KCL at the anode: (Vs - V)/Rt = Is (exp(V/Vt) - 1) + V/R (Sze; H&H ch.1),
    with the tester's drive: supply through the probe's low resistor and both ports."""
    from scipy.optimize import brentq

    from incircuit.bench.junctions import THERMAL_VOLTAGE as vt

    rt = PROFILE.probe_ohms(0, "low") + PROFILE.port_high_ohms + PROFILE.port_low_ohms
    vs = PROFILE.supply_volts

    def kcl(v: float) -> float:
        beside = v / r_beside if r_beside else 0.0
        return (vs - v) / rt - i_s * math.expm1(v / vt) - beside
    return brentq(kcl, 0.0, vs)


def test_diode_sensitivity_follows_kcl_with_resistor_beside_sze():
    # S = d ln V_in / d ln V_alone under the same change of Is (x4 and /4)
    alone = Board("t", (Part("D1", "D", ("A", "K"), model="DX"),), DX)
    assert _judge(alone, "D1").sensitivity.value == pytest.approx(1.0, abs=S_ATOL)

    def expected(r: float) -> float:
        up, down = _forward_volts(4e-14, r), _forward_volts(0.25e-14, r)
        base_up, base_down = _forward_volts(4e-14, None), _forward_volts(0.25e-14, None)
        return ((up - down) / _forward_volts(1e-14, r)) / ((base_up - base_down) / _forward_volts(1e-14, None))

    for r in (1e3, 200.0):
        j = _judge(alone.with_part(Part("R1", "R", ("A", "K"), r)), "D1")
        # atol 0.05: the tester reads forward voltage in ADC steps of ~2 mV against
        # a swing of ~70 mV between the two perturbed readings
        assert j.sensitivity.value == pytest.approx(expected(r), abs=0.05)


def test_leaky_capacitor_shows_as_self_discharge():
    b = Board("t", (Part("C1", "C", ("P", "0"), 100e-6, tolerance=Tolerance.symmetric(0.2)),))
    j = _judge(b, "C1")
    assert j.verdict == "reliable"
    faults = {f.fault.kind: f for f in j.faults}
    assert faults["leakage"].detectable and faults["esr"].detectable
    assert faults["open"].reading.kind == "nothing"


def test_swapped_band_is_used_for_detection():
    class Everything:
        def contains(self, reading):
            return True

    j = _judge(_beside(10e6), "R1", band=Everything())
    assert not any(f.detectable for f in j.faults)


def test_judgement_json_shape():
    j = _judge(_beside(100.0), "R1")
    d = json.loads(json.dumps(j.to_dict()))
    assert d["verdict"] in ("reliable", "predictable", "masked")
    assert isinstance(d["sensitivity"], float) and all(isinstance(r, str) for r in d["reasons"])
    assert {"fault", "reading", "detectable"} <= set(d["faults"][0])
    assert {"action", "verdict", "reading"} <= set(d["lift"][0])
    assert all({"instrument", "reading", "reliable", "text"} <= set(a) for a in d["advice"])
    assert d["cost"]["runs_simulated"] > 0
