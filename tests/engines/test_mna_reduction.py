"""Network reduction: it must not change what the probes see."""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest

from incircuit.circuit import elements
from incircuit.engines import get_engine
from incircuit.engines.base import Source, Watch
from incircuit.engines.branches import from_circuit
from incircuit.engines.mna import GMIN, reduce_network
from incircuit.model import Board, Model, Part

ENGINE = get_engine("analytic")
DX = Model("DX", "D", {"is": 1e-14, "n": 1.0, "cjo": 5e-12})


def ladder_board(seed: int) -> Board:
    """Random board: resistive ladder, capacitors, an inductor, diodes, ties,
    dangling branches and a part far away."""
    rng = np.random.default_rng(seed)
    parts = []
    nets = ["A", "B", "C"] + [f"N{k}" for k in range(12)]
    for k in range(3, len(nets)):
        parts.append(Part(f"R{k}", "R", (nets[k], nets[int(rng.integers(0, k))]), float(10 ** rng.uniform(1.5, 5))))
    for k in range(6):
        a, b = rng.choice(len(nets), 2, replace=False)
        parts.append(Part(f"RX{k}", "R", (nets[a], nets[b]), float(10 ** rng.uniform(2, 5))))
    parts += [
        Part("C1", "C", ("N3", "N4"), 1e-6, params={"esr": 0.5}),
        Part("C2", "C", ("N5", "A"), 10e-9),
        Part("C3", "C", ("N6", "N7"), 100e-9),  # may form a floating island
        Part("L1", "L", ("N8", "B"), 1e-3, params={"dcr": 3.0}),
        Part("D1", "D", ("N9", "N10"), model="DX"),
        Part("D2", "D", ("C", "N2"), model="DX"),
        Part("R0", "R", ("N11", "N1"), 0.0),  # tie
        Part("RD1", "R", ("N4", "DANGLE1"), 1e3),  # dangling chain
        Part("CD1", "C", ("DANGLE1", "DANGLE2"), 1e-9),
        Part("DD1", "D", ("DANGLE2", "DANGLE3"), model="DX"),
        Part("RFAR", "R", ("FAR1", "FAR2"), 1e3),  # not connected to the probes
    ]
    return Board(f"ladder{seed}", tuple(parts), {"DX": DX})


STEPS = (
    ((Source(680.0, 5.0), Source(22.0, 0.0), None), 200e-6, None),
    ((Source(470e3, 0.0), None, Source(22.0, 0.0)), 1e-3, Watch(0, 1.3, rising=False)),
    ((None, Source(680.0, 0.0), Source(22.0, 5.0)), 100e-6, None),
)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_reduced_and_unreduced_agree(seed):
    board = ladder_board(seed)
    probes = ("A", "B", "C")
    reduced = ENGINE.open(board, probes, 20e-12)
    full = ENGINE.open(board, probes, 20e-12, reduce=False)
    assert len(reduced.network.nets) < len(full.network.nets)
    for drive, duration, watch in STEPS:
        times = np.linspace(0.0, duration, 6)
        a = reduced.run(drive, duration, watch=watch, sample_times=times)
        b = full.run(drive, duration, watch=watch, sample_times=times)
        # Schur elimination is exact; pruning drops the GMIN of dangling nets
        # (1e-12 S): agreement to 1e-7 V / relative covers both and rounding
        assert a.crossed == b.crossed
        assert a.duration == pytest.approx(b.duration, rel=1e-7)
        np.testing.assert_allclose(a.samples, b.samples, rtol=1e-7, atol=1e-7)
        assert a.nets.keys() == b.nets.keys()
        inner = [k for k in a.nets if not k.startswith("DANGLE")]
        np.testing.assert_allclose([a.nets[k] for k in inner], [b.nets[k] for k in inner], rtol=1e-7, atol=1e-7)
        # unreduced, GMIN (1e-12 S to ground) slowly charges the dangling chain's
        # small capacitances (GMIN V t / C ~ 1e-4 V over these steps); reduced,
        # they sit exactly at their neighbour's voltage
        dangling = [k for k in a.nets if k.startswith("DANGLE")]
        np.testing.assert_allclose([a.nets[k] for k in dangling], [b.nets[k] for k in dangling], atol=1e-3)
    assert "FAR1" not in a.nets and "DANGLE3" in a.nets


def test_schur_complement_is_the_resistance_distance():
    # two-terminal resistance of a random resistor network after eliminating
    # every internal net equals the resistance distance (Klein & Randic 1993),
    # computed by networkx from the Laplacian pseudo-inverse
    rng = np.random.default_rng(7)
    g = nx.connected_watts_strogatz_graph(30, 4, 0.3, seed=7)
    parts = []
    for k, (u, v) in enumerate(g.edges):
        r = float(10 ** rng.uniform(1, 4))
        g.edges[u, v]["r"] = r
        parts.append(Part(f"R{k}", "R", (f"N{u}", f"N{v}"), r))
    br = from_circuit(elements(Board("g", tuple(parts))))
    net = reduce_network(br, ("N0", "N17"), 0.0)
    assert net.nets == ("N0", "N17")
    r_eff = -1.0 / net.G[0, 1]
    # GMIN to ground (1e-12 S on 30 nets) changes it by ~1e-8 relative
    assert r_eff == pytest.approx(nx.resistance_distance(g, 0, 17, weight="r"), rel=1e-7)
    # only GMIN leaks to ground: the row sum is at most the 30 nets' GMIN
    assert 0 < net.G[0, 0] + net.G[0, 1] <= 30 * GMIN * (1 + 1e-6)


def test_dangling_nets_take_their_neighbours_voltage():
    b = Board(
        "t",
        (
            Part("R1", "R", ("A", "B"), 1e3),
            Part("R2", "R", ("B", "X"), 1e3),  # X dangles
            Part("C1", "C", ("X", "Y"), 1e-9),  # Y dangles further
        ),
    )
    s = ENGINE.open(b, ("A", "B"), 0.0)
    assert s.network.nets == ("A", "B")
    res = s.run((Source(1e3, 5.0), Source(1e-3, 0.0)), 1e-3)
    assert res.nets["X"] == res.nets["B"] == res.nets["Y"]
