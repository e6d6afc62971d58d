"""Several readings from a CSV file: rows, defaults and one-line errors."""

import pytest

from incircuit.errors import InputError
from incircuit.model import Board, Part
from incircuit.readings import load_observations, observation

BOARD = Board("t", (
    Part("C1", "C", ("V", "G"), 10e-6),
    Part("R1", "R", ("V", "M"), 1e3),
    Part("Q1", "Q", ("C", "B", "E"), model="QN"),
))


def _write(tmp_path, text):
    path = tmp_path / "readings.csv"
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_rows_with_own_pins_and_named_probes(tmp_path):
    path = _write(tmp_path, "part,probes,reading\n# a comment\nC1,,4.1uF esr 2.3\n"
                            "r1,v;m,\"1k, \"\nQ1,,npn 250\n")
    obs = load_observations(path, BOARD)
    assert [(o.part, o.probes, o.reading.kind) for o in obs] == [
        ("C1", ("V", "G"), "capacitor"), ("R1", ("V", "M"), "resistor"),
        ("Q1", ("C", "B", "E"), "bjt-npn")]
    assert obs[0].where == f"{path}:3"


@pytest.mark.parametrize(
    "text,line,why",
    [
        ("part,reading\nC1,4u\n", 1, "expected the header"),
        ("part,probes,reading\nC9,,4u\n", 2, "no part 'C9'"),
        ("part,probes,reading\nC1,V;X,4u\n", 2, "no net 'X'"),
        ("part,probes,reading\nC1,V,4u\n", 2, "two or three nets"),
        ("part,probes,reading\nC1,,4.1\n", 2, "bare number"),
        ("part,probes,reading\nC1,,4u\nC1,,4u,extra\n", 3, "expected 3 cells"),
        ("part,probes,reading\n", 1, "no readings"),
        ("", 1, "empty"),
    ],
)
def test_bad_rows_name_file_and_line(tmp_path, text, line, why):
    path = _write(tmp_path, text)
    with pytest.raises(InputError) as info:
        load_observations(path, BOARD)
    assert str(info.value).startswith(f"{path}:{line}: ")
    assert why in str(info.value) and "\n" not in str(info.value)


def test_missing_file_is_an_input_error(tmp_path):
    with pytest.raises(InputError, match="cannot read readings file"):
        load_observations(str(tmp_path / "nope.csv"), BOARD)


def test_single_observation_defaults_kind_from_the_part():
    assert observation(BOARD, "r1", "470").reading.value == 470.0
    with pytest.raises(InputError, match="a net is named twice"):
        observation(BOARD, "C1", "4u", "V,V")
