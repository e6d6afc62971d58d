"""Cross-checks against ngspice (slow): the multimeter's DC solve and a verdict.

ngspice is an independent simulator (ngspice user manual: .op analysis,
diode model with IS and N). The diode test current into a diode with a
resistor beside it, and a resistor network behind a low-voltage ohmmeter,
are solved by ngspice's operating point and by the bench model's Newton
iteration; the judge gives the same verdict and sensitivity on either engine.
"""

from __future__ import annotations

import pytest

from incircuit.bench import bench_profiles, diode_drop, ohms
from incircuit.engines.ngspice import available
from incircuit.judge import judge
from incircuit.model import Board, Model, Part
from incircuit.predict import predict
from incircuit.tester.profile import load_profile

REASON = available()
pytestmark = [pytest.mark.slow,
              pytest.mark.skipif(REASON is not None, reason=f"ngspice not available: {REASON}")]

METER = next(p for p in bench_profiles() if p.kind == "multimeter")


def _ngspice_volts(elements: list[tuple], current: float) -> float:
    """V(A) with ``current`` forced from ground into A, node B at ground (.op)."""
    from PySpice.Spice.Netlist import Circuit

    c = Circuit("check")
    c.model("DX", "D", IS=1e-14, N=1.0)
    c.I("test", c.gnd, "A", current)
    for name, kind, a, b, value in elements:
        a, b = (c.gnd if n == "B" else n for n in (a, b))
        if kind == "R":
            c.R(name, a, b, value)
        else:
            c.D(name, a, b, model="DX")
    analysis = c.simulator(temperature=27, nominal_temperature=27).operating_point()
    return float(analysis["A"][0])


def test_diode_test_matches_ngspice_operating_point():
    elements = [("1", "D", "A", "M", None), ("2", "R", "M", "B", 220.0), ("3", "R", "A", "B", 2.2e3)]
    board = Board("t", (Part("D1", "D", ("A", "M"), model="DX"), Part("R2", "R", ("M", "B"), 220.0),
                        Part("R3", "R", ("A", "B"), 2.2e3)), {"DX": Model("DX", "D", {"is": 1e-14, "n": 1.0})})
    ours = diode_drop(board, "A", "B", METER).value
    # rtol 1e-4: ngspice's default reltol (1e-3) on currents, gmin 1e-12 S per junction
    assert ours == pytest.approx(_ngspice_volts(elements, METER.diode_current), rel=1e-4)


def test_low_voltage_ohms_match_ngspice_operating_point():
    elements = [("1", "R", "A", "B", 10e3), ("2", "D", "A", "M", None), ("3", "R", "M", "B", 100.0)]
    board = Board("t", (Part("R1", "R", ("A", "B"), 10e3), Part("D1", "D", ("A", "M"), model="DX"),
                        Part("R3", "R", ("M", "B"), 100.0)), {"DX": Model("DX", "D", {"is": 1e-14, "n": 1.0})})
    reading = ohms(board, "A", "B", METER)
    assert reading.setting == "20 kohm range"
    volts = _ngspice_volts(elements, reading.current)
    assert reading.value * reading.current == pytest.approx(volts, rel=1e-4)
    assert volts < 0.2  # the junction stays off: R1 alone, 10 kohm x 10 uA


def test_verdict_and_sensitivity_agree_between_engines():
    board = Board("t", (Part("R3", "R", ("A", "B"), 10e3), Part("R14", "R", ("A", "M"), 4.7e3),
                        Part("R15", "R", ("M", "B"), 10e3)))
    profile = load_profile()
    found = {}
    for engine in ("analytic", "ngspice"):
        j = judge(board, "R3", predict(board, "R3", profile=profile, engine=engine), profile, engine)
        found[engine] = j
    a, n = found["analytic"], found["ngspice"]
    assert a.verdict == n.verdict == "predictable"
    # both readings carry the tester's ~0.3 % divider resolution
    assert a.sensitivity.value == pytest.approx(n.sensitivity.value, abs=0.02)
    assert [f.detectable for f in a.faults] == [f.detectable for f in n.faults]
