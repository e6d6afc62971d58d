"""Properties of the whole-board analyses, against independent references.

* Effective resistance between two nodes of a random resistor network:
  networkx's ``resistance_distance`` (Klein & Randic, "Resistance distance",
  J. Math. Chem. 12 (1993)).
* Reciprocity of passive RLC networks: Z(a->b) = Z(b->a) (reciprocity
  theorem, e.g. Alexander & Sadiku, Fundamentals of Electric Circuits, 5th
  ed., ch. 4 exercises on linear networks).
* A piece of circuit joined to the rest at one net carries no current between
  the probes (Kirchhoff's current law across a one-node cut): the reduced
  board reads exactly like the whole board.
"""

from __future__ import annotations

import math

import networkx as nx
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from incircuit.bench import Network
from incircuit.judge.runs import reachable
from incircuit.model import Board, Model, Part
from incircuit.predict import identify
from incircuit.tester.profile import load_profile

NETS = ["A", "B", "N1", "N2", "N3", "N4"]


@st.composite
def resistor_boards(draw):
    count = draw(st.integers(3, 10))
    parts = []
    for i in range(count):
        a, b = draw(st.sampled_from(NETS)), draw(st.sampled_from(NETS))
        if a == b:
            continue
        parts.append(Part(f"R{i}", "R", (a, b), draw(st.floats(1.0, 1e6))))
    # a spine keeps A and B connected
    parts.append(Part("RS", "R", ("A", "B"), draw(st.floats(1.0, 1e6))))
    return Board("t", tuple(parts))


@settings(max_examples=40, deadline=None)
@given(resistor_boards())
def test_dc_impedance_is_resistance_distance_klein_randic(board):
    g = nx.Graph()
    for p in board.parts:
        a, b = p.pins
        old = g.get_edge_data(a, b, {"g": 0.0})["g"]
        g.add_edge(a, b, g=old + 1.0 / p.value)
    for u, v, data in g.edges(data=True):
        data["r"] = 1.0 / data["g"]
    component = g.subgraph(nx.node_connected_component(g, "A")).copy()
    expected = nx.resistance_distance(component, "A", "B", weight="r", invert_weight=True)
    z = Network(board, 2 * math.pi * 1e3).impedance("A", "B")
    # GMIN (1e-12 S per node) against at most ~1 Mohm paths: relative error < 1e-5
    assert z.real == pytest.approx(expected, rel=1e-5)
    assert abs(z.imag) <= 1e-9 * abs(z.real)


@st.composite
def rlc_boards(draw):
    parts = []
    for i in range(draw(st.integers(2, 8))):
        a, b = draw(st.sampled_from(NETS)), draw(st.sampled_from(NETS))
        if a == b:
            continue
        kind = draw(st.sampled_from("RCL"))
        value = {"R": draw(st.floats(1.0, 1e5)), "C": draw(st.floats(1e-10, 1e-5)),
                 "L": draw(st.floats(1e-6, 1e-2))}[kind]
        parts.append(Part(f"{kind}{i}", kind, (a, b), value))
    parts.append(Part("RS", "R", ("A", "B"), 1e3))
    return Board("t", tuple(parts))


@settings(max_examples=40, deadline=None)
@given(rlc_boards(), st.sampled_from([1e3, 1e5]))
def test_reciprocity_of_passive_networks(board, f):
    net = Network(board, 2 * math.pi * f)
    # reciprocity holds to round-off; 1e-6 leaves room for ill-conditioned draws
    assert net.impedance("A", "B") == pytest.approx(net.impedance("B", "A"), rel=1e-6)


def test_reduced_board_reads_like_the_whole_board_kcl():
    dx = {"DX": Model("DX", "D", {"is": 1e-14})}
    board = Board("t", (
        Part("R1", "R", ("A", "B"), 10e3), Part("R2", "R", ("A", "B"), 47e3),
        # hanging from A only: a diode, a big capacitor and a resistor chain
        Part("D1", "D", ("A", "H1"), model="DX"), Part("C1", "C", ("H1", "H2"), 100e-6),
        Part("R3", "R", ("H2", "H1"), 1e3),
        # hanging from B only
        Part("C2", "C", ("B", "H3"), 10e-6),
    ), dx)
    reduced = reachable(board, ("A", "B"))
    assert {p.name for p in reduced.parts} == {"R1", "R2"}
    profile = load_profile()
    whole = identify(board, ("A", "B"), profile, trace_points=0).reading
    small = identify(reduced, ("A", "B"), profile, trace_points=0).reading
    assert whole.kind == small.kind == "resistor"
    # the hanging pieces carry no current at any instant: the same reading,
    # up to the engine's step tolerance
    assert whole.value == pytest.approx(small.value, rel=1e-6)
