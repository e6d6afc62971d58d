"""Which board nets the ngspice deck merges, and where it anchors islands.

Two kinds of element carry no current and are merged away before ngspice
sees the board:

* 0-ohm resistors and 0-henry inductors (ties);
* *dead* parts: parts outside every biconnected block of the board's graph
  that holds the tester (joined to every probe) or a coupled inductor. A
  dead part hangs off the live circuit at a single net, or lies in an
  island no probe touches, so by Kirchhoff's current law no current flows
  through it (only the 1e12 ohm leaks) and, starting discharged, every
  resistor, diode and inductor drops no voltage and every capacitor keeps
  zero charge: all its nets are one. Left in, such parts are a numerical
  trap: an inductor in series with nothing but the leaks is a mode of
  L / 1e12 ohm, femtoseconds long, and a loop of them makes ngspice's
  time steps wander.

A coupled inductor in a loop (or shorted: both ends on one net) is kept,
since the coupling can drive a current around it; an open-ended winding
carries none and is left out with its coupling (its far net then follows
the near one: the induced open-circuit voltage is not computed).

>>> from incircuit.circuit import Element, Circuit
>>> chain = Circuit((Element("R1", "R", ("P", "Q"), 1e3), Element("L1", "L", ("Q", "X"), 1e-3),
...                  Element("C1", "C", ("X", "Y"), 1e-6)))
>>> node_of, dropped = simplify(chain, ("P", "Q"))
>>> node_of["X"] == node_of["Y"] == node_of["Q"] != node_of["P"], sorted(dropped)
(True, [1, 2])
"""

from __future__ import annotations

from typing import Iterable, Mapping, Sequence

import networkx as nx

from ..circuit import Circuit

__all__ = ["Nets", "simplify", "anchors", "ISLAND_C", "ISLAND_FRACTION"]

#: Farads to the tester's ground on one net of each island without a probe's
#: stray capacitance (at least; see ISLAND_FRACTION): keeps its common-mode
#: voltage well conditioned.
ISLAND_C = 1e-15
#: ... or this fraction of the island's capacitance, when larger.
ISLAND_FRACTION = 1e-9

_GROUND = "~tester"
_PARTS = ("R", "C", "L", "D", "Q", "M", "J")


class Nets:
    """Union-find of nets and their generated names ``n1 n2 ...``."""

    def __init__(self, nets: Iterable[str] = ()) -> None:
        self.parent: dict[str, str] = {}
        for net in nets:
            self.find(net)

    def find(self, net: str) -> str:
        self.parent.setdefault(net, net)
        while self.parent[net] != net:
            self.parent[net] = self.parent[self.parent[net]]
            net = self.parent[net]
        return net

    def join(self, a: str, b: str) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra != rb:
            self.parent[max(ra, rb)] = min(ra, rb)

    def names(self) -> dict[str, str]:
        """Every net -> ``n<k>``, numbered by the sorted order of their groups."""
        roots: dict[str, str] = {}
        for net in sorted(self.parent):
            roots.setdefault(self.find(net), f"n{len(roots) + 1}")
        out = {net: roots[self.find(net)] for net in self.parent}
        return dict(sorted(out.items(), key=lambda kv: (int(kv[1][1:]), kv[0])))


def _is_tie(kind: str, value: float | None) -> bool:
    return kind in ("R", "L") and value is not None and float(value) == 0.0


def simplify(circuit: Circuit, probe_nets: Sequence[str]) -> tuple[dict[str, str], set[int]]:
    """Board net -> node name after merging ties and dead parts; element indices left out.

    A part is live when it lies in a biconnected block of the board's graph
    (plus the tester, joined to every probe) that holds the tester, or a
    loop with a coupled inductor; every other part carries no current.
    """
    nets = Nets(probe_nets)
    for e in circuit.elements:
        for p in e.nodes:
            nets.find(p)
        if _is_tie(e.kind, e.value):
            nets.join(*e.nodes[:2])
    coupled = {name for c in circuit.couplings for name in c.inductors}
    graph = nx.Graph()
    graph.add_edges_from((nets.find(p), _GROUND) for p in probe_nets)
    edge_parts: dict[frozenset, list[int]] = {}
    for i, e in enumerate(circuit.elements):
        if e.kind not in _PARTS or _is_tie(e.kind, e.value):
            continue
        roots = {nets.find(p) for p in e.nodes}
        pairs = [tuple(roots)] if len(roots) == 2 else [(f"~hub{i}", r) for r in roots] if len(roots) > 2 else []
        for a, b in pairs:
            graph.add_edge(a, b)
            edge_parts.setdefault(frozenset((a, b)), []).append(i)
    live: set[int] = set()
    for block in nx.biconnected_component_edges(graph):
        owners = {i for a, b in block for i in edge_parts.get(frozenset((a, b)), ())}
        touches_tester = any(_GROUND in (a, b) for a, b in block)
        loop = len(block) > 1 or len(owners) > 1  # current can circulate
        if touches_tester or (loop and any(circuit.elements[i].name in coupled for i in owners)):
            live |= owners
    dropped: set[int] = set()
    for i, e in enumerate(circuit.elements):
        if e.kind in _PARTS and not _is_tie(e.kind, e.value) and i not in live:
            if e.kind == "L" and e.name in coupled and len({nets.find(p) for p in e.nodes}) == 1:
                continue  # a shorted winding still carries current
            dropped.add(i)
            for p in e.nodes[1:]:
                nets.join(e.nodes[0], p)
    return nets.names(), dropped


def anchors(circuit: Circuit, node_of: Mapping[str, str], probes: Sequence[str],
            held: Sequence[str]) -> tuple[tuple[str, float], ...]:
    """(node, farads) for each island of nodes joined by elements that needs one.

    An island needs one when it holds capacitors, junctions or a probe, but
    no node of ``held`` (probe nodes with stray capacitance); the anchor sits
    on a probe node when the island has one.
    """
    islands = Nets(node_of.values())
    for e in circuit.elements:
        for p in e.nodes[1:]:
            islands.join(node_of[e.nodes[0]], node_of[p])
    held_roots = {islands.find(n) for n in held}
    farads: dict[str, float] = {}
    for e in circuit.elements:
        if e.kind in ("C", "D", "Q", "M", "J"):  # junctions have capacitance too
            root = islands.find(node_of[e.nodes[0]])
            farads[root] = farads.get(root, 0.0) + (abs(float(e.value or 0.0)) if e.kind == "C" else 0.0)
    chosen: dict[str, str] = {}
    for node in [*probes, *sorted(set(node_of.values()), key=lambda n: int(n[1:]))]:
        root = islands.find(node)
        if root not in held_roots and (root in farads or node in probes):
            chosen.setdefault(root, node)
    return tuple((node, max(ISLAND_C, ISLAND_FRACTION * farads.get(root, 0.0))) for root, node in chosen.items())
