"""Cards, comments, continuation lines and annotations, per the ngspice user manual.

Sections cited: 2.3.1 ".TITLE line", 2.3.3 "Comments", 2.3.4 "End-of-line
comments", 2.3.5 "Continuation lines", 2.1.4.1 "Lines".
"""

import pytest

from incircuit.errors import NetlistError
from incircuit.netlist import parse_text
from incircuit.netlist.lexer import Card, parse_annotations, read_cards, split_fields


def test_title_is_the_first_line_manual_2_3_1():
    # the first line is the title even when it looks like an element card
    board = parse_text("R9 looks like a part\nR1 a b 1k\n")
    assert board.name == "R9 looks like a part"
    assert [p.name for p in board.parts] == ["R1"]


def test_dot_title_overrides_the_first_line_manual_2_3_1():
    board = parse_text("*****\n.title Test of CAM cell\nR1 a b 1k\n")
    assert board.name == "Test of CAM cell"


def test_star_lines_are_comments_manual_2_3_3():
    _, cards = read_cards("t\n* R1 a b 1k\n   * indented comment\nR2 a b 2k\n", "x")
    assert [c.text for c in cards] == ["R2 a b 2k"]


@pytest.mark.parametrize(
    "line, code, comment",
    [
        ("RF2 1 2 1K $ Gain should be 100", "RF2 1 2 1K", "Gain should be 100"),  # manual 2.3.4 example
        ("C1 1 2 10p ; Check open-loop gain", "C1 1 2 10p", "Check open-loop gain"),  # manual 2.3.4 example
        ("R1 1 2 1k // new value", "R1 1 2 1k", "new value"),  # manual 2.3.4: '//'
        ("R1 1 2 1k;no blank needed", "R1 1 2 1k", "no blank needed"),
        ("R1 1 2 1k\t$tab before", "R1 1 2 1k", "tab before"),
        ("R1 1 2 1k,$comma before", "R1 1 2 1k,", "comma before"),
        # '$' glued to a field is not a comment: it stays part of the field
        ("R1 1 2 1k$glued", "R1 1 2 1k$glued", ""),
        ("R1 1 2 {a;b}", "R1 1 2 {a;b}", ""),  # inside braces nothing starts a comment
    ],
)
def test_end_of_line_comments_manual_2_3_4(line, code, comment):
    _, cards = read_cards("t\n" + line + "\n", "x")
    assert (cards[0].text, cards[0].comment) == (code, comment)


def test_dollar_glued_to_a_value_is_a_bad_number_manual_2_3_4():
    with pytest.raises(NetlistError, match=r"^<text>:2: bad number '1k\$glued'"):
        parse_text("t\nR1 1 2 1k$glued\n")


def test_continuation_lines_keep_the_first_line_manual_2_3_5():
    text = "t\n* c\nR1 a b\n* comment between\n\n+ 1k ; tol=1%\n+ m=2\nR2 a b 1k\n"
    _, cards = read_cards(text, "x.cir")
    assert cards[0] == Card("R1 a b 1k m=2", "x.cir", 3, "tol=1%")
    assert cards[1].line == 8
    board = parse_text(text, path="x.cir")
    assert board.part("R1").location.line == 3
    assert board.part("R1").value == 500.0  # R = value/m, manual eq. 3.1


def test_continuation_without_a_card_is_an_error():
    with pytest.raises(NetlistError, match=r"^<text>:2: continuation"):
        parse_text("t\n+ 1k\nR1 a b 1k\n")


def test_crlf_tabs_and_dos_end_of_file_mark():
    board = parse_text("t\r\nR1\ta\tb\t1k\r\nC1 a b 1n\r\n\x1a")
    assert [p.name for p in board.parts] == ["R1", "C1"]


def test_fields_are_separated_by_blanks_commas_equals_parentheses_manual_2_1_4_1():
    card = Card(".model MOD1 npn (bf=50 is=1e-13, vbf = 50)", "x", 1)
    assert split_fields(card) == [".model", "MOD1", "npn", "bf", "=", "50", "is", "=", "1e-13", "vbf", "=", "50"]


def test_braces_and_quotes_stay_one_field():
    card = Card("R1 a b { 2 * (r0 + 1k) } r='a + 1'", "x", 1)
    assert split_fields(card) == ["R1", "a", "b", "{ 2 * (r0 + 1k) }", "r", "=", "'a + 1'"]


@pytest.mark.parametrize("text", ["R1 a b {1+2", "R1 a b 1+2}", "R1 a b (1k", "R1 a b 1k)", "R1 a b '1k"])
def test_unbalanced_fields_are_errors(text):
    with pytest.raises(NetlistError, match=r"^x:7: unbalanced"):
        split_fields(Card(text, "x", 7))


# -- part annotations in the end-of-line comment -----------------------------

@pytest.mark.parametrize(
    "comment, minus, plus",
    [
        ("tol=5%", 0.05, 0.05),
        ("tol=1 %", 0.01, 0.01),
        ("TOL=0.1%", 0.001, 0.001),
        ("tol=±10%", 0.10, 0.10),
        ("tol=-20%/+80%", 0.20, 0.80),
        ("tol=+80%/-20%", 0.20, 0.80),
        ("decoupling, tol=10% near U3", 0.10, 0.10),
    ],
)
def test_tolerance_annotation(comment, minus, plus):
    tol = parse_annotations(Card("C1 a b 1u", "x", 1, comment))["tol"]
    # exact decimal/100 conversions: one rounding, rtol 1e-15
    assert tol.minus == pytest.approx(minus, rel=1e-15, abs=0)
    assert tol.plus == pytest.approx(plus, rel=1e-15, abs=0)
    assert tol.origin == "netlist"


@pytest.mark.parametrize("comment", ["tol=5", "tol=tight", "tol=-20%/-80%", "tol=-100%/+5%", "tol="])
def test_bad_tolerance_annotation_is_an_error(comment):
    with pytest.raises(NetlistError, match=r"^x:3: bad tolerance"):
        parse_annotations(Card("C1 a b 1u", "x", 3, comment))


def test_esr_and_dcr_annotations_are_spice_numbers():
    found = parse_annotations(Card("C1 a b 1u", "x", 1, "esr=50m dcr=0.2 tol=5%"))
    assert found["esr"] == pytest.approx(0.05, rel=1e-15, abs=0)  # 50m = 50e-3 (manual table 2.2)
    assert found["dcr"] == 0.2


def test_annotations_need_a_word_boundary():
    assert parse_annotations(Card("C1 a b 1u", "x", 1, "pitol=5% xesr=1")) == {}


def test_annotations_on_dollar_comments():
    board = parse_text("t\nC1 a b 1u $ tol=-10%/+30% esr=0.5\n")
    part = board.part("C1")
    assert (part.tolerance.minus, part.tolerance.plus) == (0.10, 0.30)
    assert part.params["esr"] == 0.5
