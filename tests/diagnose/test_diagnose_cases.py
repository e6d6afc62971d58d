"""Constructed boards with known answers, diagnosed with the tester model on
the analytic engine. The typed readings are worked out by hand from the
textbook combination rules (parallel capacitances add, parallel
resistances combine as 1/R = sum 1/Ri: Horowitz & Hill, The Art of
Electronics, 3rd ed., 1.2.1 and 1.4.1), not taken from the simulator.

The healthy bands use 100 Monte Carlo samples here to keep the suite quick;
the sampling itself is checked in test_bands_statistics.py.
"""

import math

import pytest

from incircuit.diagnose import MARGIN, diagnose
from incircuit.model import Board, Part, Tolerance
from incircuit.readings import observation

T = Tolerance.symmetric
SAMPLES = 100


def _run(board, part, *readings):
    obs = [observation(board, p, text, probes) for p, probes, text in readings]
    return diagnose(board, part, obs, samples=SAMPLES, seed=3)


DRIED = Board("dried electrolytic", (
    Part("C1", "C", ("V", "0"), 10e-6, tolerance=T(0.2)),    # electrolytic
    Part("C2", "C", ("V", "0"), 100e-9, tolerance=T(0.1)),   # ceramic beside it
    Part("R1", "R", ("V", "0"), 100e3, tolerance=T(0.05)),   # bleeder
))


def test_dried_electrolytic_is_removed_with_its_fitted_value():
    # C1 dried to 40 %: 0.4 * 10 uF + 100 nF = 4.1 uF (parallel C add).
    d = _run(DRIED, "C1", ("C1", None, "4.1uF"))
    assert d.decision == "remove-and-test"
    best = d.hypotheses[0].hypothesis
    assert (best.part, best.fault) == ("C1", "drift")
    # 0.40 within 0.02: the tester's own reading of 4.0 uF + 0.1 uF carries
    # its stated accuracy (about 1 %) and the fit's precision (0.5 %).
    assert best.amount == pytest.approx(0.40, abs=0.02)
    assert d.groups[0][0] == "C1" and d.groups[0][1] >= MARGIN * d.groups[1][1]
    assert not d.bands[0].contains(d.observations[0].reading)


SHORTED = Board("shorted neighbour", (
    Part("R1", "R", ("P5", "SIG"), 10e3, tolerance=T(0.05)),   # pull-up being checked
    Part("C2", "C", ("P5", "0"), 100e-9, tolerance=T(0.1)),    # decoupling capacitor
    Part("R2", "R", ("SIG", "0"), 1e3, tolerance=T(0.05)),     # load to ground
))


def test_shorted_neighbour_means_look_elsewhere_and_names_it():
    # C2 shorted joins P5 to 0, so R2 sits across R1: 10k || 1k = 909 ohm.
    d = _run(SHORTED, "R1", ("R1", None, "909"))
    assert d.decision == "look-elsewhere"
    assert d.groups[0][0] == "C2"
    assert "C2" in d.reason
    assert d.hypotheses[0].hypothesis.part == "C2"
    # the next step separates the neighbour from the part itself
    assert d.next_step is not None and d.next_step.separation >= 1.0


TWINS = Board("twin capacitors", (
    Part("C1", "C", ("V", "0"), 100e-6, tolerance=T(0.2)),
    Part("C2", "C", ("V", "0"), 100e-6, tolerance=T(0.2)),
))


def test_healthy_twins_reading_their_sum_are_left_in_place():
    # Two 100 uF on one rail read 200 uF (parallel C add).
    d = _run(TWINS, "C1", ("C1", None, "200uF"))
    assert d.decision == "leave-in-place"
    assert d.groups[0][0] == "healthy"
    assert d.bands[0].contains(d.observations[0].reading)


TRIANGLE = Board("resistor triangle", (
    Part("R1", "R", ("A", "B"), 10e3, tolerance=T(0.01)),
    Part("R2", "R", ("B", "C"), 10e3, tolerance=T(0.01)),
    Part("R3", "R", ("A", "C"), 10e3, tolerance=T(0.01)),
))


@pytest.fixture(scope="module")
def triangle():
    """Diagnoses of R1 from the A-B reading, the B-C reading, and both."""
    first = _run(TRIANGLE, "R1", ("R1", None, "10k"))
    second = _run(TRIANGLE, "R1", ("R2", "B;C", "10k"))
    both = _run(TRIANGLE, "R1", ("R1", None, "10k"), ("R2", "B;C", "10k"))
    return first, second, both


def test_two_readings_together_settle_what_one_cannot(triangle):
    # Healthy A-B reads 10k || 20k = 6.67k. A-B = 10k fits R2 open and R3
    # open alike (symmetry); B-C then reads 10k only if R3 is open
    # (R2 open would give R1 + R3 = 20k).
    one, _, both = triangle
    assert one.decision == "inconclusive"
    assert {g for g, _ in one.groups[:2]} == {"R2", "R3"}
    assert both.decision == "look-elsewhere"
    assert both.groups[0][0] == "R3"


def test_evidence_of_several_readings_adds_in_log_likelihood(triangle):
    # Independent readings: ln L(r1, r2 | h) = ln L(r1 | h) + ln L(r2 | h)
    # for every hypothesis without a fitted amount (Bayes' rule for
    # independent data, e.g. MacKay 2003 ch. 2).
    first, second, both = triangle

    def scores(d):
        return {(s.hypothesis.part, s.hypothesis.fault): s.log_score - math.log(s.hypothesis.prior)
                for s in d.hypotheses if not s.hypothesis.fitted}

    a, b, ab = scores(first), scores(second), scores(both)
    for key in ab:
        assert ab[key] == pytest.approx(a[key] + b[key], abs=1e-9)  # same runs, same seed


AGED = Board("aged electrolytic", (
    Part("C1", "C", ("V", "0"), 470e-6, tolerance=T(0.2), params={"esr": 0.1}),
    Part("C2", "C", ("V", "0"), 100e-9, tolerance=T(0.1)),
    Part("R1", "R", ("V", "0"), 10e3, tolerance=T(0.05)),
))


def test_high_esr_with_normal_capacitance_is_removed():
    # An aged electrolytic can keep its capacitance and gain series
    # resistance (common practice). 430 uF is inside the healthy band; the
    # ESR of 2.3 ohm is far above a healthy 0.1 ohm.
    d = _run(AGED, "C1", ("C1", None, "430uF esr 2.3"))
    assert d.decision == "remove-and-test"
    best = d.hypotheses[0].hypothesis
    assert (best.part, best.fault) == ("C1", "esr")
    # the tester resolves ESR in steps of about 0.31 ohm at this size
    assert best.amount == pytest.approx(2.3, abs=0.35)
    # without the ESR the same capacitance reads as healthy
    plain = _run(AGED, "C1", ("C1", None, "430uF"))
    assert plain.decision == "leave-in-place"
