"""Property: any text imports to a Board or fails with a NetlistError, nothing else.

Random decks are built from netlist-like tokens (element names, nets,
numbers with scale factors, braces, dot cards, comment and continuation
marks) and from arbitrary text. Example counts stay modest so the module
runs in a few seconds.
"""

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from incircuit.errors import NetlistError
from incircuit.model import Board
from incircuit.netlist import parse_text

TOKENS = [
    "R1", "r2", "C1", "L1", "L2", "K1", "D1", "Q1", "M1", "J1", "X1", "X2", "V1", "I1", "B1", "E1", "A1",
    "a", "b", "0", "gnd", "n1", "out",
    "1k", "10u", "4.7kOhm", "1MEG", "1M", "0", "-1", "1e3", "2.2n", "1e999", "4K7", "0.5",
    "{r0}", "{2*r0+1k}", "{(1}", "}", "{", "(", ")", "=", ",", "'1+1'", "{1/0}", "{sqrt(-1)}", "{-2**0.5}",
    "dmod", "qmod", "sub", "params:", "r=", "c=", "l=", "m=2", "area=2", "ic=0.6,", "off",
    ".model", "D", "NPN", "NMOS", "PJF", "VDMOS", "is=1e-14", "(bf=100)",
    ".subckt", ".ends", ".param", "r0=1k", ".include", "x.inc", ".lib", ".endl", ".end",
    ".if", ".else", ".endif", ".control", ".endc", ".tran", ".global", ".title",
    ";", "$", "; tol=5%", "; tol=-20%/+80%", "; tol=x", "esr=0.5", "dcr=-1", "*", "+", "//",
]

line = st.lists(st.sampled_from(TOKENS), min_size=0, max_size=8).map(" ".join)
deck_from_tokens = st.lists(line, min_size=1, max_size=14).map(lambda ls: "fuzz\n" + "\n".join(ls))

# well-formed skeleton with random values and pins, to reach the deeper code
value = st.sampled_from(["1k", "0", "-5", "10u", "{a*2}", "{b}", "1e-20", "2.2nF", "abc", "{1/0}"])
skeleton = st.tuples(value, value, value, st.sampled_from(["a b", "a a", "a", "a b c", ""])).map(
    lambda v: (
        "sk\n.param a=1k\n.subckt s p q r0=1\nR1 p q {r0}\nC1 p 0 " + v[0] + "\n.ends\n"
        f"R1 {v[3]} {v[1]} ; tol=1%\nX1 {v[3]} s r0={v[2]}\nL1 a b {v[2]}\nK1 L1 L9 0.5\nD1 a b dd\n"
        ".model dd D is=1e-14\n"
    )
)


def _check(text: str) -> None:
    try:
        board = parse_text(text)
    except NetlistError as err:
        text_of_error = str(err)
        assert "\n" not in text_of_error
        assert text_of_error.startswith("<text>:")
        return
    assert isinstance(board, Board)
    assert board.parts


FAST = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])


@FAST
@given(deck_from_tokens)
def test_token_decks_give_a_board_or_a_netlist_error(text):
    _check(text)


@FAST
@given(skeleton)
def test_skeleton_decks_give_a_board_or_a_netlist_error(text):
    _check(text)


@settings(max_examples=100, deadline=None)
@given(st.text(max_size=300))
def test_arbitrary_text_gives_a_board_or_a_netlist_error(text):
    _check(text)
