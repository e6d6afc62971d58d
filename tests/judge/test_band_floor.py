"""The healthy band of a quantity that cannot be negative stays at or above zero."""

from incircuit.judge.band import ToleranceBand
from incircuit.model import Reading


def test_band_of_a_small_resistance_starts_at_zero():
    # Ohm's law: a passive part's resistance is never negative, so an
    # instrument accuracy wider than the reading must not push the band below 0.
    band = ToleranceBand.of([Reading("resistor", 0.15, "ohm")], accuracy=lambda r: 0.6, margin=0.0)
    assert band.ranges["resistor"] == (0.0, 0.75)
