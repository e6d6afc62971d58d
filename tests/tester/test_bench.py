"""The instrument's quantisation: ADC counts and timer ticks.

An n-bit ADC maps [0, Vref) onto 2**n codes of Vref / 2**n each and a
truncating converter floors (Horowitz & Hill, The Art of Electronics, 3rd
ed., ch. 13, ADC transfer function); the timer counts whole periods. The
band-gap auto-ranging is this tester's common practice.
"""

from __future__ import annotations

import math

import pytest

from incircuit.tester.bench import read_adc, ticks
from incircuit.tester.profile import load_profile

P = load_profile()
LSB_FULL = P.adc_full_scale_volts / 2**P.adc_bits
LSB_GAP = P.adc_bandgap_volts / 2**P.adc_bits


@pytest.mark.parametrize("volts", [1.2, 2.5, 3.333, 4.99])
def test_large_voltages_floor_to_full_scale_counts(volts):
    r = read_adc(P, volts)
    assert r.count == math.floor(volts / LSB_FULL)
    assert r.lsb == LSB_FULL
    assert 0.0 <= volts - r.volts < LSB_FULL


@pytest.mark.parametrize("volts", [0.0011, 0.137, 0.65, 1.0999])
def test_small_voltages_use_the_bandgap_reference(volts):
    r = read_adc(P, volts)
    assert r.lsb == LSB_GAP
    assert r.count == math.floor(volts / LSB_GAP)
    assert 0.0 <= volts - r.volts < LSB_GAP


def test_out_of_range_voltages():
    assert read_adc(P, -0.3).count == 0 and read_adc(P, -0.3).volts == 0.0
    assert read_adc(P, 7.0).count == 2**P.adc_bits - 1
    assert read_adc(P, float("nan")).count == 0


def test_timer_floors_to_whole_ticks():
    tick = P.timer_tick_seconds
    assert ticks(P, 0.0) == 0
    assert ticks(P, 0.99 * tick) == 0
    assert ticks(P, 1000 * tick) == 1000
    assert ticks(P, 1000.5 * tick) == 1000
