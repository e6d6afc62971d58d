"""The typed-reading parser against published codes and the documented rules."""

import pytest

from incircuit.errors import ReadingError
from incircuit.readings import parse_reading

# Letter-and-digit code for resistance and capacitance values: IEC 60062:2016,
# clause 4 (the letter stands for the decimal point and the multiplier).
# rtol 1e-12: the parser builds the number from its decimal text, so only
# the last binary digit may differ.
IEC_60062_CODES = [
    ("R47", "resistor", 0.47),
    ("4R7", "resistor", 4.7),
    ("2R2", "resistor", 2.2),
    ("4K7", "resistor", 4.7e3),
    ("4k7", "resistor", 4.7e3),
    ("47K", "resistor", 47e3),
    ("M47", "resistor", 0.47e6),
    ("1M5", "resistor", 1.5e6),
    ("2G2", "resistor", 2.2e9),
    ("p47", "capacitor", 0.47e-12),
    ("4p7", "capacitor", 4.7e-12),
    ("4n7", "capacitor", 4.7e-9),
    ("4u7", "capacitor", 4.7e-6),
    ("4\u00b57", "capacitor", 4.7e-6),
]


@pytest.mark.parametrize("text,kind,value", IEC_60062_CODES)
def test_iec_60062_letter_as_decimal_point(text, kind, value):
    r = parse_reading(text)
    assert r.kind == kind
    assert r.value == pytest.approx(value, rel=1e-12)


# SI prefixes, BIPM SI Brochure 9th ed. (2019) table 7; M is mega and m is
# milli there too, which is why a typed "1M" is a mega-ohm here (unlike the
# SPICE number scale factors, ngspice manual sec. 2.4.1, where M is milli).
@pytest.mark.parametrize(
    "text,kind,value",
    [
        ("1M", "resistor", 1e6),
        ("1 Mohm", "resistor", 1e6),
        ("1Meg", "resistor", 1e6),
        ("10 mohm", "resistor", 10e-3),
        ("4.7mF", "capacitor", 4.7e-3),
        ("4.7uF", "capacitor", 4.7e-6),
        ("4.7 \u03bcF", "capacitor", 4.7e-6),
        ("4.7 UF", "capacitor", 4.7e-6),
        ("100n", "capacitor", 100e-9),
        ("22pF", "capacitor", 22e-12),
        ("10uH", "inductor", 10e-6),
        ("470 \u2126", "resistor", 470.0),
        ("470 \u03a9", "resistor", 470.0),
        ("470R", "resistor", 470.0),
        ("10KOHM", "resistor", 10e3),
        ("1e-6F", "capacitor", 1e-6),
        ("diode 580mV", "diode", 0.58),
        ("diode 0.58V", "diode", 0.58),
        ("led 1.9", "diode", 1.9),
        ("cap 4.7uF", "capacitor", 4.7e-6),
        ("res 10k", "resistor", 10e3),
        ("ind 10u", "inductor", 10e-6),
        ("npn 250", "bjt-npn", 250.0),
        ("npn250", "bjt-npn", 250.0),
        ("cap: 4.7uF", "capacitor", 4.7e-6),
        ("res10k", "resistor", 10e3),
    ],
)
def test_prefixes_units_and_kind_words(text, kind, value):
    r = parse_reading(text)
    assert (r.kind, r.value) == (kind, pytest.approx(value, rel=1e-12))  # decimal text, see above


@pytest.mark.parametrize("text", ["nothing", "None", "open", "Nothing found", "  open  "])
def test_nothing_words(text):
    r = parse_reading(text)
    assert r.kind == "nothing" and r.value is None


@pytest.mark.parametrize(
    "text,esr",
    [("4.1uF esr 2.3ohm", 2.3), ("4.1uF, ESR 2.3", 2.3), ("4.1 \u00b5F ESR=2R3", 2.3),
     ("4.1uF esr 230m", 0.23), ("4.1uF; esr: 2.3 \u03a9", 2.3)],
)
def test_value_with_secondary_esr(text, esr):
    r = parse_reading(text)
    assert r.kind == "capacitor"
    assert r.value == pytest.approx(4.1e-6, rel=1e-12)
    assert r.extra["esr"] == pytest.approx(esr, rel=1e-12)


def test_default_kind_fills_a_bare_number():
    assert parse_reading("470", "resistor").value == 470.0
    assert parse_reading("0.6", "diode").unit == "V"


@pytest.mark.parametrize(
    "text,default,kind",
    [
        ("100u", "inductor", "inductor"),    # the letter suits the part: 100 uH
        ("4u7", "resistor", "capacitor"),    # it does not: a capacitance reading
        ("10k", "capacitor", "resistor"),    # a capacitor can read as a resistor
        ("2R2", "capacitor", "resistor"),
        ("4m7", "capacitor", "capacitor"),   # 4.7 mF
        ("10m", "resistor", "resistor"),     # 10 mohm
        ("580m", "diode", "diode"),          # 0.58 V
        ("10uF", "inductor", "capacitor"),   # the unit wins over everything
    ],
)
def test_kind_from_part_and_prefix_letter(text, default, kind):
    assert parse_reading(text, default).kind == kind


@pytest.mark.parametrize(
    "text,default,why",
    [
        ("4.7", "capacitor", "bare number"),
        ("470", None, "nothing says"),
        ("4,7uF", None, "comma"),
        ("4.7MF", None, "not a believable capacitor"),
        ("cap 10k ohm", None, "not measured in that unit"),
        ("xyz", None, "is not a number"),
        ("", None, "empty"),
        ("10k esr 2", None, "esr belongs"),
        ("4.7uF esr 3F", None, "esr must be a resistance"),
        ("diode", None, "needs a value"),
        ("-5k", None, "is not a number"),
        ("0 ohm", None, "above zero"),
        ("npn 2k", None, "current gain"),
    ],
)
def test_unreadable_text_is_one_line_error(text, default, why):
    with pytest.raises(ReadingError) as info:
        parse_reading(text, default, path="readings.csv", line=7)
    message = str(info.value)
    assert why in message
    assert message.startswith("readings.csv:7: ")
    assert "\n" not in message and "expected" in message
