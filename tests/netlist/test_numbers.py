"""SPICE number fields against the ngspice user manual.

Sections: 2.1.4.2 "Numbers" (table 2.2 "Ngspice scale factors") and 2.1.4.3
"Letters following a number". Values are exact decimal conversions, so the
comparisons use rtol=1e-15 (one rounding of a double) with atol=0.
"""

import math

import pytest

from incircuit.netlist.numbers import NumberError, SCALE_FACTORS, is_number, parse_number

RTOL = 1e-15  # one double rounding


@pytest.mark.parametrize(
    "text, expected",
    [
        # ngspice manual 2.1.4.2, table 2.2: each scale factor
        ("1T", 1e12),
        ("1G", 1e9),
        ("1MEG", 1e6),
        ("1Meg", 1e6),
        ("1meg", 1e6),
        ("1K", 1e3),
        ("1k", 1e3),
        ("1MIL", 25.4e-6),
        ("1mil", 25.4e-6),
        ("1M", 1e-3),  # M is milli, not mega (manual 2.1.4.3)
        ("1m", 1e-3),
        ("1U", 1e-6),
        ("1N", 1e-9),
        ("1P", 1e-12),
        ("1F", 1e-15),  # F is femto, not farad
        # manual 2.1.4.2: integers, decimals, exponent form
        ("12", 12.0),
        ("-44", -44.0),
        ("3.14159", 3.14159),
        ("1e-14", 1e-14),
        ("2.65e3", 2650.0),
        (".5", 0.5),
        ("5.", 5.0),
        ("+3", 3.0),
        # exponent and scale factor together
        ("1e3k", 1e6),
        ("2.5e-3MEG", 2500.0),
        # manual 2.1.4.3: letters after a number or a scale factor are ignored
        ("10V", 10.0),
        ("10Volts", 10.0),
        ("10Hz", 10.0),
        ("1kHz", 1e3),
        ("1e3V", 1e3),
        ("10uF", 1e-5),
        ("4.7kOhm", 4700.0),
        ("1MA", 1e-3),
        ("1MSec", 1e-3),
        ("1MMhos", 1e-3),
        ("47fF", 47e-15),
        ("1e-3wwww", 1e-3),
    ],
)
def test_scale_factors_ngspice_manual_2_1_4(text, expected):
    assert math.isclose(parse_number(text), expected, rel_tol=RTOL, abs_tol=0.0)


def test_manual_2_1_4_3_equivalent_spellings_of_1000():
    # "1000, 1000.0, 1000Hz, 1e3, 1.0e3, 1kHz, and 1k all represent the same number"
    values = {parse_number(t) for t in ("1000", "1000.0", "1000Hz", "1e3", "1.0e3", "1kHz", "1k")}
    assert values == {1000.0}


def test_scale_factor_table_matches_manual_table_2_2():
    assert SCALE_FACTORS == {
        "MEG": 1e6, "MIL": 25.4e-6, "T": 1e12, "G": 1e9, "K": 1e3,
        "M": 1e-3, "U": 1e-6, "N": 1e-9, "P": 1e-12, "F": 1e-15,
    }


@pytest.mark.parametrize(
    "text",
    [
        "", "k", "abc", "1.2.3", "4K7",  # RKM only in LT mode (manual 2.1.4.3): refused
        "2200u2nnn", "1k$", "10%", "--1", "1e999", "1_0", "{1}",
    ],
)
def test_bad_numbers(text):
    with pytest.raises(NumberError):
        parse_number(text)
    assert not is_number(text)


def test_letter_e_without_exponent_digits_is_a_unit_letter():
    # manual 2.1.4.3: "1e" is the number 1 followed by an ignored letter
    assert parse_number("1e") == 1.0
