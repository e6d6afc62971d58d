"""What-if variants: options parsed with SPICE numbers, changed boards, coverage compared.

SPICE scale factors (``k`` kilo, ``m`` milli, ``meg`` mega): ngspice user
manual, section 2.1.4.2. Reading of 10 kohm beside 100 ohm and beside
nothing: Horowitz & Hill, *The Art of Electronics*, 3rd ed., ch. 1.
"""

from __future__ import annotations

import pytest

from incircuit.errors import InputError
from incircuit.survey import apply_changes, compare, parse_changes, survey


def test_set_reads_spice_numbers_ngspice_manual_2_1_4_2(tb):
    board = tb.board(tb.MASKED)
    changes = parse_changes(board, [], ["R2=1meg", "RB=4.7k", "C1=10m"])
    assert [c.value for c in changes] == pytest.approx([1e6, 4.7e3, 10e-3], rel=1e-12)  # exact decimals
    changed = apply_changes(board, changes)
    assert changed.part("R2").value == pytest.approx(1e6, rel=1e-12)
    assert board.part("R2").value == pytest.approx(100.0, rel=1e-12)  # the original is untouched


@pytest.mark.parametrize("lift, set_, words", [
    (["R1"], [], "PART:PIN"), (["R1:3"], [], "pins 1 to 2"), (["X9:1"], [], "no part"),
    ([], ["R1"], "PART=VALUE"), ([], ["R1=4K7"], "RKM"), ([], ["R1=-5"], "above zero"),
    ([], ["R1=abc"], "bad number"),
])
def test_bad_options_name_the_option(tb, lift, set_, words):
    with pytest.raises(InputError, match=words):
        parse_changes(tb.board(tb.MASKED), lift, set_)


def test_lifting_the_neighbour_unmasks_the_part_and_raises_coverage(tb, profile, masked_survey):
    board = tb.board(tb.MASKED)
    changes = parse_changes(board, ["R2:1"], [])
    after = survey(apply_changes(board, changes), profile, tb.QUICK)
    w = compare(masked_survey, after, changes)
    # R1 alone between A and B reads its own 10 kohm: reliable (H&H ch.1)
    assert {"part": "R1", "before": "masked", "after": "reliable"} in w["changed"]
    assert w["coverage_after"]["share"] > w["coverage_before"]["share"]
    assert w["difference"] == pytest.approx(
        w["coverage_after"]["share"] - w["coverage_before"]["share"], rel=1e-12)  # same arithmetic
    assert w["changes"][0]["text"] == "lift R2 pin 1 (off net A)"
