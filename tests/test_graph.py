"""Graph view of a board: paths around a part, tied nets, DC resistance.

References:
* series and parallel combination, balanced bridge: Horowitz & Hill,
  The Art of Electronics, 3rd ed., ch. 1;
* effective resistance from the Laplacian pseudo-inverse:
  Klein & Randic, "Resistance distance", J. Math. Chem. 12 (1993),
  computed here with numpy, and networkx's ``resistance_distance``;
* simple paths: networkx ``all_simple_edge_paths``.
"""

from __future__ import annotations

import math
import random

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from incircuit import graph
from incircuit.errors import InputError
from incircuit.graph import (
    MAX_PATH_PARTS,
    MAX_PATHS,
    TIE_OHMS,
    between,
    board_graph,
    equivalent_resistance,
    is_tie,
    surroundings,
    tied_nets,
)
from incircuit.model import Board, Model, Part

# Linear solves of small, well-conditioned conductance matrices agree with
# the pseudo-inverse to round-off; 1e-9 leaves room for conductances that
# span six decades.
RTOL = 1e-9


def R(name: str, a: str, b: str, ohms: float) -> Part:
    return Part(name, "R", (a, b), ohms)


def C(name: str, a: str, b: str, farads: float) -> Part:
    return Part(name, "C", (a, b), farads)


def L(name: str, a: str, b: str, henries: float, **params) -> Part:
    return Part(name, "L", (a, b), henries, params=params)


def D(name: str, anode: str, cathode: str, model: str = "DSIG") -> Part:
    return Part(name, "D", (anode, cathode), model=model)


def parallel(*rs: float) -> float:
    return 1.0 / sum(1.0 / r for r in rs)


def pinv_resistance(edges: list[tuple[str, str, float]], a: str, b: str) -> float:
    """Klein & Randic (1993): R_ab = G+_aa + G+_bb - 2 G+_ab, G the Laplacian."""
    nodes = sorted({n for u, v, _ in edges for n in (u, v)})
    index = {n: i for i, n in enumerate(nodes)}
    lap = np.zeros((len(nodes), len(nodes)))
    for u, v, ohms in edges:
        g = 1.0 / ohms
        i, j = index[u], index[v]
        lap[i, i] += g
        lap[j, j] += g
        lap[i, j] -= g
        lap[j, i] -= g
    plus = np.linalg.pinv(lap)
    i, j = index[a], index[b]
    return float(plus[i, i] + plus[j, j] - 2 * plus[i, j])


# -- equivalent resistance --------------------------------------------------
def test_series_and_parallel_horowitz_hill_ch1():
    # Horowitz & Hill ch. 1: series resistances add, parallel conductances add
    b = Board("t", (R("R1", "A", "M", 4.7e3), R("R2", "M", "B", 10e3), R("R3", "A", "B", 22e3)))
    expected = parallel(4.7e3 + 10e3, 22e3)
    assert equivalent_resistance(b, "A", "B") == pytest.approx(expected, rel=RTOL)
    assert equivalent_resistance(b, "A", "B", without=["R3"]) == pytest.approx(14.7e3, rel=RTOL)


def test_ladder_series_parallel_recursion_horowitz_hill_ch1():
    # A ladder of series R and shunt R to ground, reduced from the far end with
    # the series/parallel rules (Horowitz & Hill ch. 1).
    rng = random.Random(7)
    parts, series, shunt = [], [], []
    for i in range(12):
        rs, rp = rng.uniform(100, 10e3), rng.uniform(1e3, 100e3)
        series.append(rs)
        shunt.append(rp)
        parts.append(R(f"RS{i}", f"N{i}", f"N{i + 1}", rs))
        parts.append(R(f"RP{i}", f"N{i + 1}", "GND", rp))
    rest = math.inf
    for rs, rp in zip(reversed(series), reversed(shunt)):
        rest = rs + (rp if math.isinf(rest) else parallel(rp, rest))
    b = Board("ladder", tuple(parts))
    assert equivalent_resistance(b, "N0", "GND") == pytest.approx(rest, rel=RTOL)


def test_r2r_ladder_reads_r_horowitz_hill():
    # R-2R ladder with 2R shunts on every node and a 2R termination: each
    # node reads R to ground, since 2R || (R + R) = R at every stage
    # (series/parallel reduction, Horowitz & Hill ch. 1).
    r = 10e3
    parts = [R("RT", "N0", "GND", 2 * r), R("RP", "N0", "GND", 2 * r)]
    for i in range(8):
        parts.append(R(f"RP{i}", f"N{i + 1}", "GND", 2 * r))
        parts.append(R(f"RS{i}", f"N{i + 1}", f"N{i}", r))
        b = Board("r2r", tuple(parts))  # the ladder up to its newest node N(i+1)
        assert equivalent_resistance(b, f"N{i + 1}", "GND") == pytest.approx(r, rel=RTOL)
    # without its own shunt, N8 sees R in series with the R of the next node
    assert equivalent_resistance(b, "N8", "GND", without=["RP7"]) == pytest.approx(2 * r, rel=RTOL)


def test_balanced_bridge_carries_no_middle_current_horowitz_hill_ch1():
    # A balanced Wheatstone bridge (R1/R2 = R3/R4): the middle resistor
    # carries no current, so R = (R1 + R2) || (R3 + R4).
    parts = (R("R1", "A", "L", 1e3), R("R2", "L", "B", 2e3), R("R3", "A", "M", 5e3),
             R("R4", "M", "B", 10e3), R("R5", "L", "M", 777.0))
    b = Board("bridge", parts)
    assert equivalent_resistance(b, "A", "B") == pytest.approx(parallel(3e3, 15e3), rel=RTOL)


def test_unbalanced_bridge_against_pinv_and_networkx_klein_randic():
    parts = (R("R1", "A", "L", 1e3), R("R2", "L", "B", 3.3e3), R("R3", "A", "M", 4.7e3),
             R("R4", "M", "B", 1e3), R("R5", "L", "M", 2.2e3))
    b = Board("bridge", parts)
    edges = [(p.pins[0], p.pins[1], p.value) for p in parts]
    expected = pinv_resistance(edges, "A", "B")
    g = nx.Graph()
    for u, v, ohms in edges:
        g.add_edge(u, v, weight=1.0 / ohms)  # networkx: weight is a conductance
    reference = nx.resistance_distance(g, "A", "B", weight="weight", invert_weight=False)
    assert equivalent_resistance(b, "A", "B") == pytest.approx(expected, rel=RTOL)
    assert equivalent_resistance(b, "A", "B") == pytest.approx(reference, rel=RTOL)


@pytest.mark.parametrize("seed", range(8))
def test_random_networks_against_laplacian_pinv_klein_randic(seed):
    rng = random.Random(seed)
    n = rng.randint(4, 14)
    nets = [f"N{i}" for i in range(n)]
    edges = [(nets[i], nets[rng.randrange(i)], 0.0) for i in range(1, n)]  # a spanning tree
    edges += [tuple(rng.sample(nets, 2)) + (0.0,) for _ in range(rng.randint(0, 2 * n))]
    # values spread over six decades, as on a real board (10 ohm .. 10 Mohm)
    edges = [(u, v, 10 ** rng.uniform(1, 7)) for u, v, _ in edges]
    b = Board("random", tuple(R(f"R{i}", u, v, w) for i, (u, v, w) in enumerate(edges)))
    for _ in range(5):
        a, z = rng.sample(nets, 2)
        assert equivalent_resistance(b, a, z) == pytest.approx(pinv_resistance(edges, a, z), rel=RTOL)


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.integers(0, 5), st.integers(0, 5), st.floats(1.0, 1e6)),
                min_size=1, max_size=14))
def test_resistance_distance_is_a_metric_klein_randic(raw):
    # Klein & Randic (1993): resistance distance is symmetric, and obeys the
    # triangle inequality; never more than the series sum of any one path
    # (Rayleigh monotonicity).
    edges = [(f"N{u}", f"N{v}", w) for u, v, w in raw if u != v]
    if not edges:
        return
    b = Board("h", tuple(R(f"R{i}", u, v, w) for i, (u, v, w) in enumerate(edges)))
    nets = b.nets
    for x in nets:
        for y in nets:
            rxy = equivalent_resistance(b, x, y)
            assert rxy == pytest.approx(equivalent_resistance(b, y, x), rel=RTOL)
            for z in nets:
                bound = equivalent_resistance(b, x, z) + equivalent_resistance(b, z, y)
                assert rxy <= bound * (1 + 1e-9) + 1e-9  # round-off slack only
    first = edges[0]
    assert equivalent_resistance(b, first[0], first[1]) <= first[2] * (1 + 1e-9)


def test_disconnected_is_infinite_and_capacitors_do_not_conduct():
    b = Board("t", (R("R1", "A", "M", 1e3), C("C1", "M", "B", 1e-6), D("D1", "A", "B")))
    assert equivalent_resistance(b, "A", "B") == math.inf


def test_zero_ohm_merges_and_inductor_counts_its_dcr():
    b = Board("t", (R("R0", "A", "A2", 0.0), R("R1", "A2", "B", 1e3), L("L1", "A", "B", 1e-3, dcr=250.0)))
    assert equivalent_resistance(b, "A", "B") == pytest.approx(parallel(1e3, 250.0), rel=RTOL)
    b2 = Board("t", (R("R1", "A", "B", 1e3), L("L1", "A", "B", 1e-3)))
    assert equivalent_resistance(b2, "A", "B") == 0.0


# -- tied nets --------------------------------------------------------------
def test_tied_nets_groups():
    b = Board("t", (
        L("FB1", "VIN", "VIN_F", 1e-6, dcr=0.05),   # ferrite bead: tie
        R("RF1", "VIN_F", "VIN_P", 0.1),            # fuse as a small resistor: tie
        R("R1", "VIN_P", "OUT", 10.0),              # a real resistor: no tie
        L("LCOIL", "OUT", "COIL", 0.1, dcr=270.0),  # relay coil: 270 ohm, no tie
        R("J1", "A", "B", 0.0),                     # zero-ohm link
    ))
    groups = tied_nets(b)
    assert sorted(sorted(g) for g in groups) == [["A", "B"], ["VIN", "VIN_F", "VIN_P"]]
    assert is_tie(b.part("RF1")) and not is_tie(b.part("R1")) and not is_tie(b.part("LCOIL"))
    assert not is_tie(R("RX", "A", "B", TIE_OHMS))  # the threshold itself is not a tie


# -- paths ------------------------------------------------------------------
def kinds_and_parts(result) -> set[tuple[str, tuple[str, ...]]]:
    return {(p.kind, p.parts) for p in result.paths}


def test_paths_around_a_resistor_exact_set():
    b = Board("t", (
        R("R1", "A", "B", 10e3),
        R("R2", "A", "M", 4.7e3), R("R3", "M", "B", 10e3),
        C("C1", "A", "B", 100e-9),
        C("C2", "A", "N", 1e-6), C("C3", "N", "B", 1e-6),
        L("L1", "A", "P", 1e-3), C("C4", "P", "B", 10e-9),
        D("D1", "B", "A"),
        D("D2", "A", "Q"), R("R4", "Q", "B", 330.0),
        Part("U1", "X", ("A", "VCC", "B"), model="CHIP"),
    ))
    s = surroundings(b, "r1")
    assert kinds_and_parts(s) == {
        ("resistive", ("R2", "R3")),
        ("capacitive", ("C1",)),
        ("capacitive", ("C2", "C3")),
        ("mixed", ("L1", "C4")),
        ("junction", ("D1",)),
        ("junction", ("D2", "R4")),
        ("chip", ("U1",)),
    }
    assert not s.truncated
    by = {p.parts: p for p in s.paths}
    assert by[("R2", "R3")].dc_resistance == pytest.approx(14.7e3, rel=RTOL)
    assert by[("R2", "R3")].nets == ("A", "M", "B")
    # series capacitance 1/C = 1/C2 + 1/C3 (Horowitz & Hill ch. 1)
    assert by[("C2", "C3")].capacitance == pytest.approx(0.5e-6, rel=RTOL)
    assert by[("D1",)].conducts == "reverse"       # D1 conducts B -> A
    assert by[("D2", "R4")].conducts == "forward"  # D2 conducts A -> Q
    assert by[("U1",)].links[0].via == ("1", "3")
    assert list(s.pairs[0].by_kind()) == ["resistive", "capacitive", "mixed", "junction", "chip"]
    assert s.equivalent_resistance == pytest.approx(14.7e3, rel=RTOL)


@pytest.mark.parametrize("seed", range(6))
def test_paths_match_networkx_simple_paths(seed):
    # Every simple path up to MAX_PATH_PARTS that networkx finds (using no part
    # twice), and no other. Each path has exactly one kind, so the kinds
    # together must list them all, whatever steers each kind's search.
    rng = random.Random(seed)
    nets = [f"N{i}" for i in range(7)]
    makers = [lambda n, a, z: R(n, a, z, 1e3), lambda n, a, z: C(n, a, z, 1e-9),
              lambda n, a, z: L(n, a, z, 1e-6), lambda n, a, z: D(n, a, z)]
    parts = [R("R0", "N0", "N1", 1e3)]
    parts += [rng.choice(makers)(f"P{i}", *rng.sample(nets, 2)) for i in range(10)]
    parts.append(Part("Q1", "Q", tuple(rng.sample(nets, 3)), model="QN"))
    parts.append(Part("U1", "X", tuple(rng.sample(nets, 3)), model="CHIP"))
    b = Board("t", tuple(parts), models={"QN": Model("QN", "NPN")})
    a, z = parts[0].pins
    g = board_graph(b, without=[parts[0].name])
    expected = set()
    for path in nx.all_simple_edge_paths(g, a, z, cutoff=MAX_PATH_PARTS):
        names = [g.edges[u, v, k]["part"] for u, v, k in path]
        if len(set(names)) == len(names):
            expected.add(tuple(names))
    assert len(expected) < MAX_PATHS  # small enough that nothing is cut
    found = surroundings(b, parts[0].name)
    assert not found.truncated
    assert sorted(p.parts for p in found.paths) == sorted(expected)
    for group in found.pairs[0].by_kind().values():
        lengths = [len(p.parts) for p in group]
        assert lengths == sorted(lengths)  # shortest first within a kind


def test_transistor_pairs_and_junction_directions():
    b = Board("t", (
        Part("Q1", "Q", ("C", "B", "E"), model="QN"),
        R("RB", "IN", "B", 4.7e3), R("RBE", "B", "E", 47e3),
        R("RC", "VCC", "C", 1e3), D("DF", "C", "VCC"),
        Part("Q2", "Q", ("C2", "B2", "E2"), model="QP"),
    ), models={"QN": Model("QN", "NPN"), "QP": Model("QP", "PNP")})
    s = surroundings(b, "Q1")
    assert [pair.pins for pair in s.pairs] == [("C", "B"), ("C", "E"), ("B", "E")]
    assert kinds_and_parts(s.pair("B", "E")) == {("resistive", ("RBE",))}
    assert s.pair("e", "b").equivalent_resistance == pytest.approx(47e3, rel=RTOL)
    # RBE's surroundings: Q1 B->E conducts forward for an NPN
    rbe = surroundings(b, "RBE")
    (q,) = [p for p in rbe.paths if p.parts == ("Q1",)]
    assert q.kind == "junction" and q.links[0].via == ("B", "E") and q.conducts == "forward"
    g = board_graph(b)
    fwd = {k: d["forward"] for _, _, k, d in g.edges(keys=True, data=True)}
    assert fwd["Q2:B-E"] == "b" and fwd["Q1:B-E"] == "a"  # PNP conducts E -> B
    with pytest.raises(ValueError):
        s.paths  # three pairs: no single list


def test_mosfet_gate_is_capacitive_and_body_junction_on_drain_source():
    b = Board("t", (
        Part("M1", "M", ("D", "G", "S", "S"), model="MN"),
        R("RGS", "G", "S", 100e3), R("RL", "D", "S", 1e3),
    ), models={"MN": Model("MN", "NMOS")})
    gate = {p.parts: p for p in surroundings(b, "RGS").paths}
    assert gate[("M1",)].kind == "capacitive" and gate[("M1",)].links[0].nature == "gate"
    drain = {p.parts: p for p in surroundings(b, "RL").paths}
    # n-channel: the p-type body on the source conducts source -> drain
    assert drain[("M1",)].kind == "junction" and drain[("M1",)].conducts == "reverse"


def test_truncation_is_per_kind_and_keeps_the_shortest_paths():
    parts = [R("R0", "A", "B", 1e3), R("RX", "A", "M", 1.0), R("RY", "M", "B", 1.0),
             C("CX", "A", "N", 1e-9), C("CY", "N", "B", 1e-9)]
    parts += [C(f"C{i}", "A", "B", 1e-9) for i in range(MAX_PATHS + 20)]
    s = surroundings(Board("t", tuple(parts)), "R0")
    assert s.truncated and s.pairs[0].cut == ("capacitive",)
    groups = s.pairs[0].by_kind()
    assert len(groups["capacitive"]) == MAX_PATHS
    assert all(len(p.parts) == 1 for p in groups["capacitive"])  # CX-CY came later and was cut
    assert [p.parts for p in groups["resistive"]] == [("RX", "RY")]  # another kind is unaffected


def test_paths_longer_than_the_limit_are_not_listed_but_conduct():
    n = MAX_PATH_PARTS + 1
    chain = [R(f"R{i}", f"N{i}", f"N{i + 1}", 100.0) for i in range(n)]
    b = Board("t", (R("R99", "N0", f"N{n}", 1e3), *chain))
    s = surroundings(b, "R99")
    assert s.paths == () and not s.truncated
    assert s.equivalent_resistance == pytest.approx(100.0 * n, rel=RTOL)


def test_search_step_budget_sets_truncated(monkeypatch):
    monkeypatch.setattr(graph.paths, "MAX_SEARCH_STEPS", 3)
    nets = [f"N{i}" for i in range(6)]
    parts = [R(f"R{i}{j}", a, z, 1e3) for i, a in enumerate(nets) for j, z in enumerate(nets) if i < j]
    assert surroundings(Board("k6", tuple(parts)), "R01").truncated


def test_between_any_two_nets_and_tied_pair():
    b = Board("t", (R("R1", "A", "B", 1e3), L("L1", "B", "C", 1e-6), R("R2", "A", "C", 1e3)))
    r = between(b, "a", "c")
    assert kinds_and_parts(r) == {("resistive", ("R2",)), ("mixed", ("R1", "L1"))}
    assert r.equivalent_resistance == pytest.approx(500.0, rel=RTOL)
    assert between(b, "B", "C").tied and not r.tied
    d = r.to_dict()
    assert d["nets"] == ["A", "C"] and set(d["paths"]) == {"resistive", "mixed"}


def test_unknown_part_or_net_is_an_input_error():
    b = Board("t", (R("R1", "A", "B", 1e3),), path="board.cir")
    with pytest.raises(InputError, match="board.cir: no part 'R9'"):
        surroundings(b, "R9")
    with pytest.raises(InputError, match="no net 'Z'"):
        between(b, "A", "Z")


def test_unmodelled_parts_follow_their_pin_roles():
    # roles as incircuit.chips.apply_pin_roles attaches them to a part's params
    fuse = Part("F1", "X", ("IN", "IN_F"), model="FUSE", params={"roles": ("short", "short"), "short_ohms": 0.05})
    conn = Part("J1", "X", ("IN", "OUT"), model="CONN", params={"roles": ("open", "open")})
    sw_open = Part("SW1", "X", ("IN", "OUT"), model="SW", params={"roles": ("switch", "switch"), "switch_state": "open"})
    chip = Part("U1", "X", ("IN", "NC", "OUT"), model="CHIP",
                params={"roles": ("input", "no-connect", "output"), "pin_names": ("A", "NC", "Y")})
    b = Board("t", (R("R1", "IN_F", "OUT", 1e3), fuse, conn, sw_open, chip, R("R2", "NC", "OUT", 10.0)))
    s = surroundings(b, "R1")
    assert kinds_and_parts(s) == {("chip", ("F1", "U1"))}  # not via J1, SW1 or the NC pin
    (p,) = s.paths
    assert p.links[1].via == ("A", "Y") and p.links[0].nature == "R"
    assert [sorted(g) for g in tied_nets(b)] == [["IN", "IN_F"]]
    # a closed switch is a short like the fuse
    closed = Part("SW1", "X", ("IN", "OUT"), model="SW", params={"roles": ("switch", "switch"), "switch_state": "closed"})
    b2 = b.with_part(closed)
    r = surroundings(b2, "R1")
    (res,) = [q for q in r.paths if q.kind == "resistive"]
    assert res.parts == ("F1", "SW1") and res.dc_resistance == pytest.approx(0.05, rel=RTOL)
    assert r.equivalent_resistance == pytest.approx(0.05, rel=RTOL)


def test_gnd_means_node_zero_when_the_board_has_no_gnd_net():
    # ngspice user manual 2.1.4.5: gnd is a synonym of the ground node 0
    b = Board("t", (R("R1", "A", "0", 1e3), R("R2", "A", "0", 1e3)))
    assert between(b, "a", "gnd").nets == ("A", "0")
    assert between(b, "A", "GND").equivalent_resistance == pytest.approx(500.0, rel=RTOL)


def test_tie_parts_name_what_ties_a_group():
    b = Board("t", (L("FB1", "A", "B", 1e-6), R("R0", "B", "C", 0.0), R("R1", "A", "C", 47.0)))
    (group,) = tied_nets(b)
    assert graph.tie_parts(b, group) == ("FB1", "R0")
