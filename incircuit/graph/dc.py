"""Parts that act as a wire (tied nets) and the DC resistance between nets."""

from __future__ import annotations

import math
from typing import Iterable

import networkx as nx
import numpy as np
from scipy import sparse
from scipy.sparse.linalg import spsolve

from ..model import Board, Part
from .edges import dc_ohms

__all__ = ["TIE_OHMS", "is_tie", "tied_nets", "tie_parts", "equivalent_resistance"]

#: A resistor (or an inductor's winding resistance) below this many ohms
#: acts as a wire: against the tester's ~700 ohm and 470 kohm drive
#: resistors it shifts a reading by under about 0.15 % (common practice:
#: fuses, jumpers, ferrite beads and current shunts read as a short).
TIE_OHMS = 1.0


def is_tie(part: Part) -> bool:
    """True for a part that acts as a wire: an inductor or a resistor below
    :data:`TIE_OHMS` (an inductor's ``dcr`` counts), or an unmodelled part
    whose pin roles make it a short (fuse, bead, link, closed switch; its
    ``short_ohms``, a wire when none)."""
    ohms = dc_ohms(part)
    return ohms is not None and len(set(part.pins)) == 2 and ohms < TIE_OHMS


def tied_nets(board: Board) -> list[frozenset[str]]:
    """Groups of two or more nets joined by tie parts (see :func:`is_tie`),
    sorted by their first net name.

    >>> b = Board("t", (Part("L1", "L", ("A", "B"), 1e-6), Part("R1", "R", ("B", "C"), 0.0),
    ...                 Part("R2", "R", ("C", "D"), 10.0)))
    >>> [sorted(group) for group in tied_nets(b)]
    [['A', 'B', 'C']]
    """
    g = nx.Graph()
    g.add_edges_from(p.pins[:2] for p in board.parts if is_tie(p))
    groups = [frozenset(c) for c in nx.connected_components(g) if len(c) > 1]
    return sorted(groups, key=lambda s: sorted(s))


def tie_parts(board: Board, group: Iterable[str]) -> tuple[str, ...]:
    """Names of the tie parts that join the nets of one tied ``group``.

    >>> b = Board("t", (Part("L1", "L", ("A", "B"), 1e-6), Part("R1", "R", ("A", "B"), 10.0)))
    >>> tie_parts(b, tied_nets(b)[0])
    ('L1',)
    """
    nets = set(group)
    return tuple(p.name for p in board.parts if is_tie(p) and set(p.pins[:2]) <= nets)


def equivalent_resistance(board: Board, a: str, b: str, without: Iterable[str] = ()) -> float:
    """DC resistance between nets ``a`` and ``b`` of the board's resistors and
    inductors (an inductor is its ``dcr``, a wire when none), leaving out
    the parts named in ``without``; ``inf`` when they do not connect the nets.

    Zero-ohm parts merge their nets; the rest form a weighted Laplacian,
    solved (sparse LU) with ``b`` grounded, which equals the pseudo-inverse
    form of Klein & Randic 1993.

    >>> b = Board("t", (Part("R1", "R", ("A", "B"), 100.0), Part("R2", "R", ("A", "B"), 100.0)))
    >>> equivalent_resistance(b, "A", "B")
    50.0
    >>> equivalent_resistance(b, "A", "B", without=["R1", "R2"])
    inf
    """
    a, b = a.upper(), b.upper()
    skip = {n.upper() for n in without}
    parent: dict[str, str] = {}

    def find(x: str) -> str:
        parent.setdefault(x, x)
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    resistors: list[tuple[str, str, float]] = []
    for part in board.parts:
        ohms = dc_ohms(part) if part.name not in skip else None
        if ohms is None or part.pins[0] == part.pins[1]:
            continue
        if ohms == 0.0:
            parent[find(part.pins[0])] = find(part.pins[1])
        else:
            resistors.append((part.pins[0], part.pins[1], ohms))
    ra, rb = find(a), find(b)
    if ra == rb:
        return 0.0
    g = nx.Graph()
    g.add_nodes_from((ra, rb))
    for u, v, ohms in resistors:
        u, v = find(u), find(v)
        if u != v:
            w = g.get_edge_data(u, v, {"g": 0.0})["g"]
            g.add_edge(u, v, g=w + 1.0 / ohms)
    component = nx.node_connected_component(g, ra)
    if rb not in component:
        return math.inf
    nodes = [n for n in component if n != rb]
    index = {n: i for i, n in enumerate(nodes)}
    rows: list[int] = []
    cols: list[int] = []
    vals: list[float] = []
    for u, v, data in g.subgraph(component).edges(data=True):
        w = data["g"]
        for x, y in ((u, v), (v, u)):
            if x in index:
                rows.append(index[x])
                cols.append(index[x])
                vals.append(w)
                if y in index:
                    rows.append(index[x])
                    cols.append(index[y])
                    vals.append(-w)
    n = len(nodes)
    lap = sparse.csc_matrix((vals, (rows, cols)), shape=(n, n))  # duplicates add up
    rhs = np.zeros(n)
    rhs[index[ra]] = 1.0
    return float(np.atleast_1d(spsolve(lap, rhs))[index[ra]])
