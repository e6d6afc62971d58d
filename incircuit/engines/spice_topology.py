"""Which board nets the ngspice deck merges, and where it anchors islands.

Two kinds of element carry no current and are merged away before ngspice
sees the board:

* 0-ohm resistors and 0-henry inductors (ties);
* *bridges*: a two-terminal part whose removal cuts the board in two, with
  the tester (its ground reaches every probe) on one side at most. By
  Kirchhoff's current law nothing flows through it (only the 1e12 ohm
  leaks), so a resistor, diode or uncoupled inductor drops no voltage and a
  capacitor keeps its initial zero charge: its two nets are one. Left in,
  such a part is a numerical trap: an inductor in series with nothing but
  the leaks is a mode of L / 1e12 ohm, femtoseconds long.
  A *coupled* inductor that is a bridge also carries no current but may
  see an induced voltage; it is left out of the deck (with its couplings),
  so its far side floats.

>>> from incircuit.circuit import Element, Circuit
>>> chain = Circuit((Element("R1", "R", ("P", "Q"), 1e3), Element("L1", "L", ("Q", "X"), 1e-3),
...                  Element("C1", "C", ("X", "Y"), 1e-6)))
>>> node_of, dropped = simplify(chain, ("P", "Q"))
>>> node_of["X"] == node_of["Y"] == node_of["Q"] != node_of["P"], dropped
(True, set())
"""

from __future__ import annotations

from typing import Iterable, Mapping, Sequence

from ..circuit import Circuit

__all__ = ["Nets", "bridges", "simplify", "anchors", "ISLAND_C", "ISLAND_FRACTION"]

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


def bridges(edges: Sequence[tuple[str, str]]) -> set[int]:
    """Indices of the edges whose removal disconnects their two ends.

    Parallel edges are never bridges; self-loops are not bridges.

    >>> sorted(bridges([("a", "b"), ("b", "c"), ("c", "a"), ("c", "d"), ("d", "e"), ("d", "e")]))
    [3]
    """
    adjacent: dict[str, list[tuple[str, int]]] = {}
    for k, (a, b) in enumerate(edges):
        if a != b:
            adjacent.setdefault(a, []).append((b, k))
            adjacent.setdefault(b, []).append((a, k))
    order: dict[str, int] = {}
    low: dict[str, int] = {}
    found: set[int] = set()
    for start in adjacent:
        if start in order:
            continue
        order[start] = low[start] = len(order)
        stack = [(start, -1, iter(adjacent[start]))]
        while stack:
            node, via, it = stack[-1]
            for nxt, k in it:
                if k == via:
                    continue
                if nxt in order:
                    low[node] = min(low[node], order[nxt])
                else:
                    order[nxt] = low[nxt] = len(order)
                    stack.append((nxt, k, iter(adjacent[nxt])))
                    break
            else:
                stack.pop()
                if stack:
                    parent = stack[-1][0]
                    low[parent] = min(low[parent], low[node])
                    if low[node] > order[parent]:
                        found.add(via)
    return found


def _is_tie(kind: str, value: float | None) -> bool:
    return kind in ("R", "L") and value is not None and float(value) == 0.0


def simplify(circuit: Circuit, probe_nets: Sequence[str]) -> tuple[dict[str, str], set[int]]:
    """Board net -> node name after merging ties and bridges; element indices left out."""
    nets = Nets(probe_nets)
    for e in circuit.elements:
        for p in e.nodes:
            nets.find(p)
        if _is_tie(e.kind, e.value):
            nets.join(*e.nodes[:2])
    coupled = {name for c in circuit.couplings for name in c.inductors}
    edges: list[tuple[str, str]] = []
    owner: list[int | None] = []
    for i, e in enumerate(circuit.elements):
        if e.kind not in _PARTS or _is_tie(e.kind, e.value):
            continue
        roots = [nets.find(p) for p in e.nodes]
        if e.kind in ("R", "C", "L", "D"):
            edges.append((roots[0], roots[1]))
            owner.append(i)
        else:  # a transistor: a hub joins its pins, never merged
            edges.extend((f"~hub{i}", r) for r in roots)
            owner.extend([None] * len(roots))
    for p in probe_nets:
        edges.append((nets.find(p), _GROUND))
        owner.append(None)
    dropped: set[int] = set()
    for k in bridges(edges):
        i = owner[k]
        if i is None:
            continue
        e = circuit.elements[i]
        if e.kind == "L" and e.name in coupled:
            dropped.add(i)
        else:
            nets.join(*e.nodes[:2])
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
