"""Netlist -> Board: elements, models, parameters, subcircuits, sources, notes.

Element syntax from the ngspice user manual: 3.3.1 "Resistors", 3.3.6
"Capacitors", 3.3.10 "Inductors", 3.3.12 "Coupled (Mutual) Inductors", 7.1
"Junction Diodes", 8.1 "BJTs", 9.1 "JFETs", 11.1 "MOSFET devices"; models
2.4 ".MODEL"; subcircuits 2.5 and 2.9.3; parameters 2.9; conditions 2.13.
Values are compared with rtol=1e-15 where the importer does one decimal
conversion or one multiplication (one double rounding), atol 0.
"""

import pytest

from incircuit.model import Tolerance
from incircuit.netlist import parse_text
from incircuit.netlist.flatten import SOURCE_SHORT_OHMS

RTOL = 1e-15  # one double rounding


def approx(x):
    return pytest.approx(x, rel=RTOL, abs=0)


# -- elements ------------------------------------------------------------------

def test_manual_3_3_1_resistor_examples():
    board = parse_text("t\nR1 1 2 100\nRC1 12 17 1K\nR2 5 7 1K ac=2K\nRL 1 4 2K m=2\nR3 a b r=4.7k\n")
    values = {p.name: p.value for p in board.parts}
    assert values == {"R1": 100.0, "RC1": 1e3, "R2": 1e3, "RL": 1e3, "R3": 4.7e3}  # RL: 2K/m (eq. 3.1)
    assert board.part("R2").params["ac"] == 2e3
    assert "m" not in board.part("RL").params  # folded into the value


def test_manual_3_3_6_and_3_3_10_capacitor_and_inductor_examples():
    board = parse_text("t\nCBYP 13 0 1UF\nCOSC 17 23 10U IC=3V\nLLINK 42 69 1UH\n"
                       "LSHUNT 23 51 10U IC=15.7MA\nC2 a b c=2n m=3\nL2 a b l=1m\n")
    assert board.part("CBYP").value == approx(1e-6)
    assert board.part("COSC").params["ic"] == 3.0
    assert board.part("LSHUNT").params["ic"] == approx(15.7e-3)
    assert board.part("C2").value == approx(6e-9)  # C = value*m (eq. 3.7)
    assert board.part("L2").value == approx(1e-3)


def test_values_from_r_c_l_models_manual_3_3_3_to_3_3_11():
    board = parse_text("t\nC1 15 5 cstd\n.model cstd C cap=3n\nL1 1 2 indmod1\n.model indmod1 L ind=3n\n"
                       "R1 3 7 rmodel l=10u w=1u\n.model rmodel R rsh=50\n")
    assert board.part("C1").value == approx(3e-9)
    assert board.part("L1").value == approx(3e-9)
    assert board.part("R1").value == pytest.approx(500.0, rel=1e-12, abs=0)  # rsh*l/w (eq. 3.3)
    assert "CSTD" not in board.models  # value models are not board models


def test_zero_ohm_link_is_a_real_part():
    board = parse_text("t\nR0 a b 0\n")
    assert board.part("R0").value == 0.0


def test_semiconductors_and_models_manual_2_4():
    text = """t
DBRIDGE 2 10 DIODE1
DCLMP aa cc DMOD AREA=3.0 IC=0.2
Q23 10 24 13 QMOD IC=0.6, 5.0
Q50A 11 26 4 20 MOD1
J1 7 2 3 JM1 OFF
M1 24 2 0 20 TYPE1
M31 2 17 6 10 MOSN L=5U W=2U
.model DIODE1 D (is=1e-14 n=1.05)
.model DMOD d IS=2.52n RS=.568 N=1.752
.model QMOD npn (bf=50 is=1e-13 vbf=50)
.model MOD1 PNP
.model JM1 NJF level=1
.model TYPE1 NMOS (vto=1.5 kp=20u)
.model MOSN nmos level=1
"""
    board = parse_text(text)
    assert board.part("DBRIDGE").pins == ("2", "10")
    assert board.part("DCLMP").params == {"area": 3.0, "ic": 0.2}
    assert board.part("Q23").pins == ("10", "24", "13") and board.part("Q23").params["ic"] == (0.6, 5.0)
    assert board.part("Q50A").pins == ("11", "26", "4", "20") and board.part("Q50A").model == "MOD1"
    assert board.part("J1").params["off"] is True
    assert board.part("M31").params["l"] == approx(5e-6)
    assert board.models["DMOD"].params == {"is": approx(2.52e-9), "rs": 0.568, "n": 1.752}
    assert board.models["QMOD"].type == "NPN" and board.models["QMOD"].params["bf"] == 50.0
    assert board.models["TYPE1"].params["kp"] == approx(20e-6)
    assert all(p.tolerance is None for p in board.parts)


def test_positional_area_of_diode_bjt_jfet():
    board = parse_text("t\nD1 a b dm 2\nJ1 d g s jm 3\n.model dm D\n.model jm PJF\n")
    assert board.part("D1").params["area"] == 2.0
    assert board.part("J1").params["area"] == 3.0


def test_vdmos_has_three_nodes_and_bulk_on_source():
    board = parse_text("t\nM1 d g s IRFP240\n.model IRFP240 VDMOS (vto=4 pchan)\n")
    part = board.part("M1")
    assert part.pins == ("D", "G", "S", "S")
    assert board.models["IRFP240"].type == "PMOS"
    assert any("body diode is not modelled" in n for n in board.notes)


def test_model_binning_manual_3_2_3():
    text = ("t\nM1 d g s b nch l=1u w=5u\nM2 d g s b nch l=1u w=50u\n"
            ".model nch.1 nmos (lmin=0.1u lmax=20u wmin=0.1u wmax=10u)\n"
            ".model nch.2 nmos (lmin=0.1u lmax=20u wmin=10u wmax=100u)\n")
    board = parse_text(text)
    assert (board.part("M1").model, board.part("M2").model) == ("NCH.1", "NCH.2")


def test_coupled_inductors_manual_3_3_12():
    board = parse_text("t\nL1 1 0 10u\nL2 2 0 11u\nL3 3 0 10u\nK12 L1 L2 0.99\nK23 L2 L3 0.99\nK13 L1 L3 0.98\n")
    k = board.part("K12")
    assert (k.kind, k.pins, k.value, k.params["inductors"]) == ("K", (), 0.99, ("L1", "L2"))
    assert k.tolerance is None


def test_names_and_nets_are_upper_case():
    board = parse_text("t\nr_a nA nb 1k\n")
    assert board.part("R_A").pins == ("NA", "NB")


def test_gnd_is_node_0_manual_2_1_4_5():
    board = parse_text("t\nR1 a gnd 1k\nR2 a 0 1k\n")
    assert board.part("R1").pins == ("A", "0")


# -- tolerances ----------------------------------------------------------------

def test_tolerances_from_comments_and_defaults():
    text = "t\nR1 a b 1k ; tol=1%\nR2 a b 1k\nC1 a b 100n\nC2 a b 10u ; tol=-20%/+80% esr=0.5\nL1 a b 1m ; dcr=0.2\nD1 a b dm\n.model dm D\n"
    board = parse_text(text)
    assert board.part("R1").tolerance == Tolerance(0.01, 0.01, "netlist")
    assert board.part("R2").tolerance == Tolerance(0.05, 0.05, "default")
    assert board.part("C1").tolerance == Tolerance(0.10, 0.10, "default")
    assert board.part("C2").tolerance == Tolerance(0.20, 0.80, "netlist")
    assert board.part("C2").params["esr"] == 0.5
    assert board.part("L1").params["dcr"] == 0.2
    assert board.part("L1").tolerance.origin == "default"
    assert board.part("D1").tolerance is None


def test_annotation_on_the_wrong_kind_is_a_note():
    board = parse_text("t\nR1 a b 1k ; esr=1\nD1 a b dm ; tol=5%\n.model dm D\n")
    assert "esr" not in board.part("R1").params
    assert board.part("D1").tolerance is None
    assert any(n.startswith("<text>:2: R1: esr= annotation ignored") for n in board.notes)
    assert any(n.startswith("<text>:3: D1: tol= annotation ignored") for n in board.notes)


# -- parameters ----------------------------------------------------------------

def test_param_cards_manual_2_9_1():
    text = "t\n.param pippo=5\n.param po=6 pp=7.8 pap={AGAUSS(pippo, 1, 1.67)}\n.param pippp={pippo + pp}\n" \
           ".param p={pp}\n.param pop='pp+p'\n.param c = a + 123\n.param a = 1k\nR1 a b {pippp}\nR2 a b {pop}\nR3 a b {pap}\n"
    board = parse_text(text)
    assert board.part("R1").value == pytest.approx(12.8, rel=1e-15, abs=0)
    assert board.part("R2").value == pytest.approx(15.6, rel=1e-15, abs=0)
    assert board.part("R3").value == 5.0  # Monte Carlo functions give the nominal


def test_unused_bad_parameter_is_no_error_but_a_used_one_is():
    board = parse_text("t\n.param bad={nothere*2} good=3\nR1 a b {good}\n")
    assert board.part("R1").value == 3.0
    from incircuit.errors import NetlistError
    with pytest.raises(NetlistError, match=r"^<text>:3: parameter bad has no value \(undefined parameter 'nothere'\)"):
        parse_text("t\n.param bad={nothere*2}\nR1 a b {bad}\n")


def test_subcircuit_parameters_manual_2_9_3_example():
    text = """* Param-example
.param amplitude= 1V
.subckt myfilter in out rval=100k cval=100nF
Ra in p1 {2*rval}
Rb p1 out {2*rval}
C1 p1 0 {2*cval}
Ca in p2 {cval}
Cb p2 out {cval}
R1 p2 0 {rval}
.ends myfilter
X1 input output myfilter rval=1k cval=1n
X2 input output myfilter
V1 input 0 AC {amplitude}
.end
"""
    board = parse_text(text)
    assert board.part("X1.RA").value == 2e3
    assert board.part("X1.C1").value == approx(2e-9)
    assert board.part("X2.RA").value == 200e3
    assert board.part("X2.CA").value == approx(100e-9)
    assert board.part("X1.RA").pins == ("INPUT", "X1.P1")
    assert board.part("X1.R1").pins == ("X1.P2", "0")


def test_params_keyword_and_defaults_using_earlier_ones():
    text = "t\n.subckt s a b params: r1=1k r2={2*r1}\nR1 a b {r2}\n.ends\nX1 n1 n2 s params: r1=10\nX2 n1 n2 s\n"
    board = parse_text(text)
    assert board.part("X1.R1").value == 20.0
    assert board.part("X2.R1").value == 2e3


def test_if_blocks_manual_2_13_example_1():
    text = "t\n.param ok=0 ok2=1\nR1 1 0 2\n.if (ok && ok2)\nR11 1 0 2\n.else\nR11 1 0 0.5\n.endif\n"
    assert parse_text(text).part("R11").value == 0.5


def test_if_blocks_manual_2_13_example_2():
    text = ("t\n.param m0=0 m1=1\nM1 1 2 3 4 N1 W=1 L=0.5\n.if (m0==1)\n.model N1 NMOS level=49 vto=1\n"
            ".elseif (m1==1)\n.model N1 NMOS level=49 vto=2\n.else\n.model N1 NMOS level=49 vto=3\n.endif\n")
    assert parse_text(text).models["N1"].params["vto"] == 2.0


# -- subcircuits ---------------------------------------------------------------

def test_manual_2_5_vdivide_example():
    text = "t\nxdiv1 10 7 0 vdivide\n.subckt vdivide 1 2 3\nr1 1 2 10K\nr2 2 3 5K\n.ends\n"
    board = parse_text(text)
    assert [(p.name, p.pins, p.value) for p in board.parts] == [
        ("XDIV1.R1", ("10", "7"), 10e3), ("XDIV1.R2", ("7", "0"), 5e3)]


def test_nested_calls_get_nested_names():
    text = """t
.subckt inner a b
R5 a mid 1k
R6 mid b 1k
.ends inner
.subckt outer p q
X2 p n1 inner
C1 n1 q 1n
.ends outer
X1 in out outer
"""
    board = parse_text(text)
    assert board.part("X1.X2.R5").pins == ("IN", "X1.X2.MID")
    assert board.part("X1.X2.R6").pins == ("X1.X2.MID", "X1.N1")
    assert board.part("X1.C1").pins == ("X1.N1", "OUT")


def test_local_models_and_subcircuits_are_scoped():
    text = """t
.subckt cell a b
D1 a b dloc
.model dloc D is=1e-12
.subckt leaf x y
R1 x y 1k
.ends leaf
X9 a b leaf
.ends cell
X1 p q cell
X2 q r cell
D9 p r dtop
.model dtop D
"""
    board = parse_text(text)
    assert board.part("X1.D1").model == "X1.DLOC"
    assert board.part("X2.D1").model == "X2.DLOC"
    assert set(board.models) == {"X1.DLOC", "X2.DLOC", "DTOP"}
    assert board.part("X2.X9.R1").pins == ("Q", "R")


def test_global_nets_are_shared():
    text = "t\n.global vcc\n.subckt s a\nR1 a vcc 1k\nR2 a 0 1k\n.ends\nX1 n s\n"
    board = parse_text(text)
    assert board.part("X1.R1").pins == ("N", "VCC")
    assert board.part("X1.R2").pins == ("N", "0")


def test_undefined_subcircuit_is_an_unmodelled_part():
    board = parse_text("t\nX7 in out vcc gnd OPAMP8 gain=2\nR1 in out 1k\n")
    part = board.part("X7")
    assert (part.kind, part.model, part.pins, part.value, part.tolerance) == ("X", "OPAMP8", ("IN", "OUT", "VCC", "0"), None, None)
    assert part.params["gain"] == 2.0
    assert "<text>:2: X7: subcircuit OPAMP8 not defined: unmodelled part" in board.notes


# -- sources ---------------------------------------------------------------------

def test_sources_are_removed_with_a_note():
    board = parse_text("t\nV1 a 0 5\nI1 a 0 1m\nR1 a 0 1k\n")
    assert [p.name for p in board.parts] == ["R1"]
    assert "<text>:2: V1: voltage source removed: the board is unpowered" in board.notes
    assert "<text>:3: I1: current source removed: the board is unpowered" in board.notes


def test_keep_sources_keeps_v_as_a_short_and_drops_i():
    board = parse_text("t\nV1 a 0 DC 5\nI1 a 0 1m\nR1 a 0 1k\n", keep_sources=True)
    v1 = board.part("V1")
    assert (v1.kind, v1.pins, v1.value, v1.tolerance) == ("R", ("A", "0"), SOURCE_SHORT_OHMS, None)
    assert v1.params["source"] == "V"
    assert not board.has_part("I1")


def test_zero_volt_source_note_suggests_keep_sources():
    board = parse_text("t\nVsense a b 0\nR1 a b 1k\n")
    assert any("0 V source" in n for n in board.notes)


# -- skipped cards and board notes -------------------------------------------------

def test_everything_else_is_one_warning():
    text = """t
R1 a b 1k
.tran 1n 1u
.ac dec 10 1 1meg
.options reltol=1e-4
.meas tran x max v(a)
B1 a 0 V={V(b)*2}
E1 a 0 b 0 2
E2 a 0 b 0 2
A1 a b amod
T1 a 0 b 0 z0=50 td=1n
.model amod gain
.control
run
shell rm -rf /
.endc
.func f(x) {x*2}
R9 a b R='V(a)*2'
"""
    board = parse_text(text)
    warnings = [n for n in board.notes if "skipped" in n]
    assert len(warnings) == 1
    w = warnings[0]
    assert w.startswith("<text>:3: warning: 13 card(s) skipped")
    for kind in (".tran x1", ".ac x1", ".options x1", ".meas x1", "B (behavioural source) x1",
                 "E (voltage-controlled voltage source) x2", "A (XSPICE code model) x1",
                 "T (lossless transmission line) x1", ".control block x1", ".func x1",
                 "R (behavioural) x1", ".model GAIN x1"):
        assert kind in w, kind
    assert [p.name for p in board.parts] == ["R1"]


def test_one_net_part_and_one_pin_net_notes():
    board = parse_text("t\nR1 a a 1k\nR2 a b 1k\nR3 a 0 1k\n")
    assert "<text>:2: R1: part tied to one net only (all pins on A)" in board.notes
    assert "<text>:3: net B has one pin only (R2)" in board.notes


def test_board_path_and_part_locations():
    board = parse_text("t\n\nR1 a b 1k\n", path="demo.cir")
    assert board.path == "demo.cir"
    assert str(board.part("R1").location) == "demo.cir:3"


def test_skipped_cards_inside_subcircuits_count_once():
    text = "t\n.subckt s a b\nE1 a b a 0 2\nS1 a b a 0 sw\n.model sw SW\nR1 a b 1\n.ends\nX1 n1 n2 s\nX2 n1 n2 s\nX3 n1 n2 s\n"
    warning = next(n for n in parse_text(text).notes if "skipped" in n)
    assert "3 card(s)" in warning and ".model SW x1" in warning


def test_control_without_endc_is_noted():
    board = parse_text("t\nR1 a b 1k\n.control\nrun\nR2 a b 1k\n")
    assert [p.name for p in board.parts] == ["R1"]
    assert "<text>:3: .control without .endc: the rest of the netlist is skipped" in board.notes


def test_many_notes_of_one_kind_are_summed_up():
    from incircuit.netlist import MAX_NOTES_PER_KIND
    n = MAX_NOTES_PER_KIND + 5
    board = parse_text("t\n" + "".join(f"R{i} a{i} b{i} 1k\n" for i in range(n)))
    single = [x for x in board.notes if "has one pin only" in x and x.startswith("<text>:")]
    assert len(single) == MAX_NOTES_PER_KIND
    assert f"... and {2 * n - MAX_NOTES_PER_KIND} more notes like 'net has one pin only'" in board.notes
