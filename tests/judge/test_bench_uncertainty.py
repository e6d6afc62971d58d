"""A bench reading whose accuracy is wider than the part cannot judge it."""

from incircuit.bench import bench_profiles
from incircuit.bench.measure import BenchReading
from incircuit.judge.advice import _judge
from incircuit.judge.thresholds import BENCH_MAX_RELATIVE_UNCERTAINTY
from incircuit.model import Part


def _lcr():
    return next(p for p in bench_profiles() if p.kind == "lcr")


def test_a_matching_reading_with_a_huge_uncertainty_is_not_reliable():
    part = Part("C1", "C", ("A", "B"), 1e-6)
    # the value matches the part exactly, but +-1 uF of accuracy on 1 uF says nothing
    wide = BenchReading("lcr", "cp", 1e-6, "F", 1e-6, "1 kHz, parallel mode", frequency=1e3)
    advice = _judge(_lcr(), part, wide, 1e-6, (0.1, 0.1), [])
    assert not advice.reliable and "too wide" in advice.text
    assert advice.low == 0.0  # the window of a capacitance starts at zero


def test_a_matching_reading_within_the_limit_stays_reliable():
    part = Part("C1", "C", ("A", "B"), 1e-6)
    acc = 0.5 * BENCH_MAX_RELATIVE_UNCERTAINTY * 1e-6
    good = BenchReading("lcr", "cp", 1e-6, "F", acc, "1 kHz, parallel mode", frequency=1e3)
    assert _judge(_lcr(), part, good, 1e-6, (0.1, 0.1), []).reliable
