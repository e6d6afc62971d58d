"""Isolated parts of the E series read their value within the stated accuracy.

Values: IEC 60063 preferred numbers (E12 for resistors, E6 for capacitors and
inductors) across 10 ohm-10 Mohm, 100 pF-10 mF and 10 uH-100 mH. The check
is the profile's own stated accuracy, relative * value + counts * resolution
(Profile.accuracy), so the test fails when a method's systematic error
exceeds what the instrument states.
"""

from __future__ import annotations

import pytest

from incircuit.model import Board, Part
from incircuit.predict import identify
from incircuit.tester.profile import load_profile

E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)  # IEC 60063
E6 = (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)  # IEC 60063

PROFILE = load_profile()


def _series(numbers, first_decade: int, last_decade: int) -> list[float]:
    values = [round(m * 10.0**d, 12 - d) for d in range(first_decade, last_decade) for m in numbers]
    return values + [10.0**last_decade]


def _read(kind: str, value: float, **params):
    board = Board("sweep", (Part("X1", kind, ("A", "B"), value, params=params),))
    return identify(board, ("A", "B"), PROFILE, trace_points=0).reading


@pytest.mark.parametrize("ohms", _series(E12, 1, 7))
def test_resistor_e12_within_stated_accuracy(ohms):
    r = _read("R", ohms)
    assert r.kind == "resistor"
    assert abs(r.value - ohms) <= PROFILE.accuracy(r), (r.value, PROFILE.accuracy(r))


@pytest.mark.parametrize("farads", _series(E6, -10, -2))
def test_capacitor_e6_within_stated_accuracy(farads):
    r = _read("C", farads)
    assert r.kind == "capacitor"
    assert abs(r.value - farads) <= PROFILE.accuracy(r), (r.value, PROFILE.accuracy(r))


@pytest.mark.parametrize("henries", _series(E6, -5, -1))
def test_inductor_e6_within_stated_accuracy(henries):
    r = _read("L", henries)
    assert r.kind == "inductor"
    assert abs(r.value - henries) <= PROFILE.accuracy(r), (r.value, PROFILE.accuracy(r))


def test_accuracy_tightens_with_value_for_inductors():
    # the timer resolution dominates small inductors: the stated uncertainty shrinks as L grows
    small, large = _read("L", 10e-6), _read("L", 10e-3)
    assert PROFILE.accuracy(small) / small.value > PROFILE.accuracy(large) / large.value
