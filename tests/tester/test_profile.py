"""The instrument profile: the shipped default, validation with file and line.

The shipped values are checked against the figures the profile cites as
common practice for this class of tester (5 V supply and ADC full scale,
10-bit ADC, ~1.1 V band-gap, port pins of about 20-22 ohm, 680 ohm and
470 kohm series resistors, stray capacitance of tens of pF).
"""

from __future__ import annotations

import re
from dataclasses import FrozenInstanceError, fields
from importlib import resources
from pathlib import Path

import pytest

from incircuit.errors import ProfileError
from incircuit.model import Reading
from incircuit.tester.profile import METHODS, Profile, load_profile, parse_profile

DEFAULT_TEXT = resources.files("incircuit").joinpath("data", "tester-default.toml").read_text(encoding="utf-8")
DOCS = Path(__file__).resolve().parents[2] / "docs" / "tester-model.md"


def _line(text: str, pattern: str) -> int:
    for no, line in enumerate(text.splitlines(), 1):
        if re.match(pattern, line):
            return no
    raise AssertionError(pattern)


def test_default_profile_has_the_common_practice_figures():
    # common practice: 5 V, 10-bit ADC, ~1.1 V band-gap, 20-22 ohm ports, 680 ohm / 470 kohm
    p = load_profile()
    assert p.supply_volts == 5.0 and p.adc_full_scale_volts == 5.0 and p.adc_bits == 10
    assert 1.0 <= p.adc_bandgap_volts <= 1.2
    assert 20.0 <= p.port_low_ohms <= 22.0 and 20.0 <= p.port_high_ohms <= 22.0
    assert all(p.probe_ohms(i, "low") == 680.0 and p.probe_ohms(i, "high") == 470e3 for i in range(3))
    assert 10e-12 <= p.port_stray_farads <= 100e-12


def test_every_value_names_its_source():
    p = load_profile()
    schema = [f for f in fields(Profile) if "table" in f.metadata]
    assert len(p.sources) == len(schema)
    assert all(text.strip() for text in p.sources.values())


def test_profile_is_immutable():
    p = load_profile()
    with pytest.raises(FrozenInstanceError):
        p.supply_volts = 3.3  # type: ignore[misc]
    with pytest.raises(TypeError):
        p.sources["supply.volts"] = "x"  # type: ignore[index]


def test_docs_list_every_profile_key():
    text = DOCS.read_text(encoding="utf-8")
    for f in fields(Profile):
        if "table" in f.metadata:
            assert f"`{f.metadata['table']}.{f.metadata['key']}`" in text, f.name


def _expect(text: str, line: int | None, words: str) -> None:
    with pytest.raises(ProfileError) as info:
        parse_profile(text, "my.toml")
    assert info.value.path == "my.toml"
    assert info.value.line == line, str(info.value)
    assert words in info.value.message


def test_unknown_key_names_its_line():
    text = DEFAULT_TEXT.replace("[timer]\n", "[timer]\nspeed = 3\n")
    _expect(text, _line(text, r"speed ="), "unknown key 'speed'")


def test_unknown_table_names_its_line():
    text = DEFAULT_TEXT + "\n[extras]\nx = 1\n"
    _expect(text, _line(text, r"\[extras\]"), "unknown table [extras]")


def test_missing_key_names_its_table():
    text = re.sub(r"(?m)^tick_seconds = .*\n", "", DEFAULT_TEXT)
    _expect(text, _line(text, r"\[timer\]"), "missing 'tick_seconds'")


def test_missing_source_names_the_value_line():
    text = re.sub(r"(?m)^bits_source = .*\n", "", DEFAULT_TEXT)
    _expect(text, _line(text, r"bits = "), "missing 'bits_source'")


def test_wrong_type_names_its_line():
    text = DEFAULT_TEXT.replace("bits = 10", 'bits = "ten"')
    _expect(text, _line(text, r"bits = "), "must be a number")
    text = DEFAULT_TEXT.replace("bits = 10", "bits = 10.5")
    _expect(text, _line(text, r"bits = "), "whole number")
    text = DEFAULT_TEXT.replace("volts = 5.0\n", "volts = true\n", 1)
    _expect(text, _line(text, r"volts = true"), "must be a number")


def test_out_of_range_names_its_line():
    text = DEFAULT_TEXT.replace("tick_seconds = 62.5e-9", "tick_seconds = -1.0")
    _expect(text, _line(text, r"tick_seconds = "), "out of range")


def test_same_key_in_another_table_gets_its_own_line():
    # low_ohms appears in [port] and in every [probeN]: the error points into [probe2]
    text = DEFAULT_TEXT.replace("[probe2]\nlow_ohms = 680.0", "[probe2]\nlow_ohms = 0.0")
    line = text.splitlines().index("[probe2]") + 2
    _expect(text, line, "'probe2.low_ohms'")


def test_relations_between_values():
    text = DEFAULT_TEXT.replace("[probe3]\nlow_ohms = 680.0", "[probe3]\nlow_ohms = 1e6")
    line = text.splitlines().index("[probe3]") + 2
    _expect(text, line, "must be below 'probe3.high_ohms'")


def test_bad_toml_names_its_line():
    text = DEFAULT_TEXT.replace("bits = 10", "bits = = 10")
    _expect(text, _line(text, r"bits = = "), "not valid TOML")


def test_unreadable_file(tmp_path):
    with pytest.raises(ProfileError) as info:
        load_profile(str(tmp_path / "absent.toml"))
    assert "cannot read profile" in str(info.value)


def test_a_user_profile_by_path(tmp_path):
    path = tmp_path / "fast.toml"
    path.write_text(DEFAULT_TEXT.replace("tick_seconds = 62.5e-9", "tick_seconds = 125e-9"), encoding="utf-8")
    p = load_profile(str(path))
    assert p.timer_tick_seconds == 125e-9 and p.path == str(path)


def test_accuracy_is_relative_plus_counts():
    p = load_profile()
    for method in METHODS:
        rel, counts = p.accuracy_figures(method)
        r = Reading("capacitor", 2e-6, extra={"method": method, "resolution": 1e-9})
        # relative * |value| + counts * resolution, by definition of the stated accuracy
        assert p.accuracy(r) == pytest.approx(rel * 2e-6 + counts * 1e-9, rel=1e-12)
    assert p.accuracy(Reading("nothing")) == 0.0
