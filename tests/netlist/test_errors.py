"""Every user error is a NetlistError whose text starts with "path:line:".

Pin counts follow the ngspice user manual (3.3.1 R, 7.1 D, 8.1 Q, 9.1 J,
11.1 M, 2.5.3 subcircuit calls); the value limits follow 3.3.1 (a resistor
may be zero here: a zero-ohm link), 3.3.6 and 3.3.10; the coupling range
3.3.12.
"""

import pytest

from incircuit.errors import NetlistError
from incircuit.netlist import load, parse_text

CASES = [
    # (name, netlist text after the title, line, message start)
    ("unknown element letter", "R1 a b 1k\n1R a b 1k\n", 3, "unknown element letter '1'"),
    ("unknown element letter (symbol)", "&x=1\n", 2, "unknown element letter '&'"),
    ("missing model", "D1 a b nomodel\n", 2, "D1: model NOMODEL not defined"),
    ("missing model of a BJT", "Q1 c b e qx\n", 2, "Q1: model QX not defined"),
    ("wrong model type", "D1 a b qm\n.model qm npn\n", 2, "D1: model QM is a NPN model, not a diode model"),
    ("bad number", "R1 a b 1x2\n", 2, "bad number '1x2'"),
    ("bad number (RKM)", "R1 a b 4K7\n", 2, "bad number '4K7'"),
    ("bad number in a model", ".model d1 D is=1e-14\nD1 a b d1\nR1 a b 1k m=two\n", 4, "bad number 'two'"),
    ("wrong pin count R", "R1 a\n", 2, "wrong pin count: R1 needs 2 nodes"),
    ("wrong pin count D", "D1 a dm\n.model dm D\n", 2, "wrong pin count: D1 needs 2 nodes"),
    ("wrong pin count D (too many)", "D1 a b c dm\n.model dm D\n", 2, "wrong pin count: D1 needs 2 nodes"),
    ("wrong pin count M", "M1 d g s mm\n.model mm nmos\n", 2, "wrong pin count: M1 needs 4 nodes"),
    ("wrong pin count J", "J1 d g jm\n.model jm njf\n", 2, "wrong pin count: J1 needs 3 nodes"),
    ("wrong pin count Q", "Q1 c b qm\n.model qm pnp\n", 2, "wrong pin count: Q1 needs 3 or 4 nodes"),
    ("wrong pin count V", "V1 a\nR1 a b 1\n", 2, "wrong pin count: V1 needs 2 nodes"),
    ("X with wrong pin count", ".subckt s a b\nR1 a b 1k\n.ends\nX1 n1 s\n", 5,
     "wrong pin count: X1 gives 1 nodes, subcircuit S has 2 pins"),
    ("X with no nodes", "X1 s\n", 2, "wrong pin count: X1 needs at least one node"),
    ("subcircuit recursion", ".subckt a p\nX1 p b\n.ends\n.subckt b p\nX2 p a\n.ends\nX9 n a\n", 6,
     "subcircuit recursion: A -> B -> A"),
    ("self recursion", ".subckt a p\nX1 p a\n.ends\nX9 n a\n", 3, "subcircuit recursion: A -> A"),
    ("duplicate part", "R1 a b 1k\nr1 b c 2k\n", 3, "duplicate part name R1 (first at board.cir:2)"),
    ("duplicate after flattening", ".subckt s a\nR1 a 0 1\n.ends\nX1 n s\nX1.R1 a b 1\n", 6,
     "duplicate part name X1.R1 (first at board.cir:3)"),
    ("negative resistance", "R1 a b -1k\n", 2, "R1: negative resistance -1000 ohm"),
    ("zero capacitance", "C1 a b 0\n", 2, "C1: capacitor value must be above zero"),
    ("negative capacitance", "C1 a b -1n\n", 2, "C1: capacitor value must be above zero"),
    ("zero inductance", "L1 a b 0\n", 2, "L1: inductor value must be above zero"),
    ("undefined parameter", "R1 a b {rx*2}\n", 2, "undefined parameter 'rx'"),
    ("undefined parameter in a subckt", ".subckt s a\nR1 a 0 {q}\n.ends\nX1 n s\n", 3, "undefined parameter 'q'"),
    ("unbalanced braces", "R1 a b {1+2\n", 2, "unbalanced braces"),
    ("unbalanced closing brace", "R1 a b 1}\n", 2, "unbalanced braces"),
    ("unbalanced parentheses", ".model d1 D (is=1\nD1 a b d1\n", 2, "unbalanced parentheses"),
    ("unbalanced parentheses in braces", "R1 a b {(1+2}\n", 2, "cannot evaluate"),
    ("subckt without ends", "R1 a b 1\n.subckt s a\nR1 a 0 1\n", 3, ".subckt S without .ends"),
    ("ends without subckt", "R1 a b 1\n.ends\n", 3, ".ends without .subckt"),
    ("K naming an unknown inductor", "L1 a b 1m\nK1 L1 L2 0.5\n", 3, "K1: unknown inductor L2"),
    ("K naming a non-inductor", "L1 a b 1m\nR2 a b 1\nK1 L1 R2 0.5\n", 4, "K1: unknown inductor R2"),
    ("K out of range", "L1 a b 1m\nL2 a b 1m\nK1 L1 L2 1.5\n", 4, "K1: coupling coefficient 1.5 is outside"),
    ("no value", "R1 a b\n", 2, "R1: no value"),
    ("value twice", "R1 a b 1k r=2k\n", 2, "R1: value given twice"),
    ("bad tolerance", "R1 a b 1k ; tol=5\n", 2, "bad tolerance '5'"),
    ("negative esr", "C1 a b 1u ; esr=-1\n", 2, "esr=-1 is negative"),
    ("if without endif", "R1 a b 1\n.if (1)\nR2 a b 1\n", 3, ".if without .endif"),
    ("endif without if", "R1 a b 1\n.endif\n", 3, ".endif without .if"),
    ("param inside if", "R1 a b 1\n.if (1)\n.param a=1\n.endif\n", 4, ".param is not allowed inside .if"),
    ("include inside if", "R1 a b 1\n.if (1)\n.include x.inc\n.endif\n", 4, ".include is not allowed inside .if"),
    ("bad .param", ".param = 3\nR1 a b 1\n", 2, "expected name=value"),
    ("include without a folder", ".include x.lib\nR1 a b 1\n", 2, "cannot include 'x.lib'"),
    ("empty netlist", "* nothing\n.tran 1n 1u\n", 1, "empty netlist"),
    ("only sources", "V1 a 0 1\n", 1, "empty netlist"),
]


@pytest.mark.parametrize("body, line, message", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_error_names_path_and_line(body, line, message):
    with pytest.raises(NetlistError) as info:
        parse_text("title\n" + body, path="board.cir")
    text = str(info.value)
    assert "\n" not in text
    assert text.startswith(f"board.cir:{line}: {message}"), text
    assert (info.value.path, info.value.line) == ("board.cir", line)


def test_missing_top_file(tmp_path):
    missing = tmp_path / "nope.cir"
    with pytest.raises(NetlistError) as info:
        load(str(missing))
    assert str(info.value).startswith(f"{missing}:1: file not found")


def test_folder_instead_of_a_file(tmp_path):
    with pytest.raises(NetlistError, match=r":1: .* is a folder"):
        load(str(tmp_path))


def test_errors_inside_includes_name_the_included_file(tmp_path):
    (tmp_path / "parts.inc").write_text("* parts\nR1 a b 1k\nC1 a b -1u\n")
    (tmp_path / "top.cir").write_text("top\n.include parts.inc\n")
    with pytest.raises(NetlistError) as info:
        load(str(tmp_path / "top.cir"))
    assert str(info.value).startswith(f"{tmp_path / 'parts.inc'}:3: C1: capacitor value must be above zero")
