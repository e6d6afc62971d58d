"""Modified nodal analysis of the probed part of a board, reduced once per session.

:func:`reduce_network` turns the board's two-terminal branches (see
:mod:`.branches`) into the matrices of ``C x' + G x + A i = b``,
``Lm i' = A^T x`` over as few nets as possible:

1. ties (0 ohm resistors, 0 H inductors) merge their nets;
2. only the connected component of the probed nets is kept (the board
   floats: anything not joined to a probe by parts cannot affect it);
3. dangling branches are pruned: a net with a single branch end carries no
   current through that branch, so it takes the voltage of the far end;
4. purely resistive internal nets (no capacitance, inductor or junction,
   not probed) are eliminated exactly by a Schur complement of ``G``; their
   voltages are recovered from the kept ones, ``x_e = R x_k``.

Every net has ``GMIN`` to the tester's ground so that DC is always defined.
The tester's ground is the reference of ``x``; it is not a board net (the
board's own net ``"0"`` is an ordinary net).

>>> from incircuit.engines.branches import Branches
>>> br = Branches(resistors=[("A", "M", 1e-3), ("M", "B", 1e-3), ("M", "X", 0.2)])
>>> net = reduce_network(br, ("A", "B"), stray=0.0)  # conductances in S
>>> net.nets, round(float(-net.G[0, 1]), 9)
(('A', 'B'), 0.0005)
>>> net.where["X"] == net.where["M"]
True
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass, field

import numpy as np
import scipy.linalg as sla
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .branches import Branches
from .pwl import Curve

__all__ = ["GMIN", "Network", "reduce_network"]

#: Conductance (S) from every net to the tester's ground: SPICE's customary
#: default GMIN (ngspice manual, ``.options gmin``, default 1e-12).
GMIN = 1e-12


@dataclass(frozen=True)
class Network:
    """The reduced network of one session (indices refer to :attr:`nets`).

    G, C
        Conductance (with GMIN and the eliminated resistive nets folded in)
        and capacitance (with the probes' stray) matrices, ``n x n``.
    A, Lm
        Inductor incidence ``n x m`` (+1 at the first node) and inductance
        matrix ``m x m`` (mutual terms from couplings).
    junctions
        ``(anode, cathode, curve, name)`` per junction.
    controlled
        ``(from, to, junction, gain)`` per controlled current source:
        ``gain`` times junction ``junction``'s current (an index into
        :attr:`junctions`) flows from net ``from`` to net ``to``. They make
        ``G`` unsymmetric once folded in (see :mod:`.general`).
    probes
        Index of each probe's net.
    grounded
        Nets with capacitance to the tester's ground (the probes' stray).
    recover, eliminated
        ``x_e = recover @ x`` gives the eliminated nets' voltages.
    where
        Board net name -> ``("k", i)`` kept net i or ``("e", i)`` eliminated.
    """

    nets: tuple[str, ...]
    G: np.ndarray
    C: np.ndarray
    A: np.ndarray
    Lm: np.ndarray
    junctions: tuple[tuple[int, int, Curve, str], ...]
    probes: tuple[int, ...]
    grounded: np.ndarray
    eliminated: tuple[str, ...] = ()
    recover: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    where: dict[str, tuple[str, int]] = field(default_factory=dict)
    controlled: tuple[tuple[int, int, int, float], ...] = ()

    def voltages(self, x: np.ndarray) -> dict[str, float]:
        """Every board net's voltage from the kept nets' voltages ``x``."""
        xe = self.recover @ x if len(self.eliminated) else np.zeros(0)
        return {name: float(x[i] if kind == "k" else xe[i]) for name, (kind, i) in self.where.items()}


class _Union:
    def __init__(self) -> None:
        self.parent: dict[str, str] = {}

    def find(self, a: str) -> str:
        parent = self.parent
        root = a
        while parent.get(root, root) != root:
            root = parent[root]
        while a != root:
            parent[a], a = root, parent.get(a, a)
        return root

    def union(self, a: str, b: str) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra != rb:
            self.parent[max(ra, rb)] = min(ra, rb)


def reduce_network(
    branches: Branches,
    probe_nets: tuple[str, ...],
    stray: float,
    *,
    prune: bool = True,
    eliminate: bool = True,
    board_nets: tuple[str, ...] | None = None,
) -> Network:
    """Reduce ``branches`` to the network seen from ``probe_nets``.

    ``prune`` and ``eliminate`` switch steps 3 and 4 off (for checking that
    they do not change results). ``board_nets`` limits :attr:`Network.where`
    to those names (default: every net of the branches).
    """
    uf = _Union()
    for a, b in branches.ties:
        uf.union(a, b)
    find = uf.find
    probes = tuple(find(p) for p in probe_nets)

    # (kind, a, b, value, tag) with kind in R C L J G; tag: inductor name,
    # junction name, or (G) the name of the controlling junction
    items: list[list] = [["R", a, b, g, None] for a, b, g in branches.resistors]
    items += [["C", a, b, c, None] for a, b, c in branches.capacitors]
    items += [["L", a, b, h, name] for name, a, b, h in branches.inductors]
    items += [["J", a, b, curve, name] for name, a, b, curve in branches.junctions]
    items += [["G", a, b, gain, name] for a, b, name, gain in getattr(branches, "controlled", ())]
    if branches.ties:
        for it in items:
            it[1], it[2] = find(it[1]), find(it[2])
    coupled = {n for n1, n2, _ in branches.couplings for n in (n1, n2)}
    items = [it for it in items if it[1] != it[2] or (it[0] == "L" and it[4] in coupled)]

    # connected component of the probes (couplings join inductors magnetically)
    adj: dict[str, set[str]] = defaultdict(set)
    for _, a, b, _, _ in items:
        adj[a].add(b)
        adj[b].add(a)
    l_node = {it[4]: it[1] for it in items if it[0] == "L"}
    for n1, n2, _ in branches.couplings:
        if n1 in l_node and n2 in l_node:
            adj[l_node[n1]].add(l_node[n2])
            adj[l_node[n2]].add(l_node[n1])
    seen = set(probes)
    stack = list(probes)
    while stack:
        for nb in adj[stack.pop()]:
            if nb not in seen:
                seen.add(nb)
                stack.append(nb)
    items = [it for it in items if it[1] in seen]

    parent: dict[str, str] = {}
    if prune:
        items = _prune(items, set(probes), parent, coupled)
    alive = {n for it in items for n in it[1:3]} | set(probes)

    kept_set = set(probes)
    for kind, a, b, _, _ in items:
        if kind != "R":
            kept_set.update((a, b))
    if not eliminate:
        kept_set = set(alive)
    kept = sorted(kept_set, key=lambda n: (n not in probes, n))
    elim = sorted(alive - kept_set)
    index = {n: i for i, n in enumerate(kept)}
    index.update({n: len(kept) + i for i, n in enumerate(elim)})
    nk, ne = len(kept), len(elim)

    C = np.zeros((nk, nk))
    A_cols: list[tuple[int, int]] = []
    l_names: list[str] = []
    l_vals: list[float] = []
    junctions = []
    sources = []
    res_i, res_j, res_g = [], [], []
    for kind, a, b, v, tag in items:
        i, j = index[a], index[b]
        if kind == "R":
            res_i.append(i)
            res_j.append(j)
            res_g.append(v)
        elif kind == "C":
            C[i, i] += v
            C[j, j] += v
            C[i, j] -= v
            C[j, i] -= v
        elif kind == "L":
            A_cols.append((i, j))
            l_names.append(tag)
            l_vals.append(v)
        elif kind == "G":
            sources.append((i, j, tag, v))
        else:
            junctions.append((i, j, v, tag))
    # a source whose junction is gone (both ends on one net) carries nothing
    j_index = {name: k for k, (_, _, _, name) in enumerate(junctions)}
    controlled = tuple((i, j, j_index[tag], float(v)) for i, j, tag, v in sources if tag in j_index)
    grounded = np.zeros(nk, dtype=bool)
    if stray > 0:
        for p in probes:
            C[index[p], index[p]] += stray
            grounded[index[p]] = True
    G, recover = _conductances(np.array(res_i, dtype=int), np.array(res_j, dtype=int), np.array(res_g), nk, ne)

    m = len(A_cols)
    A = np.zeros((nk, m))
    for col, (i, j) in enumerate(A_cols):
        A[i, col] += 1.0
        A[j, col] -= 1.0
    Lm = np.diag(np.asarray(l_vals, dtype=float)) if m else np.zeros((0, 0))
    pos = {name: col for col, name in enumerate(l_names)}
    for n1, n2, k in branches.couplings:
        if n1 in pos and n2 in pos and n1 != n2:
            i, j = pos[n1], pos[n2]
            mutual = k * np.sqrt(Lm[i, i] * Lm[j, j])
            Lm[i, j] += mutual
            Lm[j, i] += mutual

    names = board_nets if board_nets is not None else branches.nets()
    where: dict[str, tuple[str, int]] = {}
    for name in names:
        r = find(name)
        while r in parent:
            r = parent[r]
        if r in index:
            i = index[r]
            where[name] = ("k", i) if i < nk else ("e", i - nk)
    for p in probe_nets:
        if p not in where:
            where[p] = ("k", index[find(p)])
    return Network(
        nets=tuple(kept),
        G=G,
        C=C,
        A=A,
        Lm=Lm,
        junctions=tuple(junctions),
        probes=tuple(index[p] for p in probes),
        grounded=grounded,
        eliminated=tuple(elim),
        recover=recover,
        where=where,
        controlled=controlled,
    )


def _conductances(ri: np.ndarray, rj: np.ndarray, g: np.ndarray, nk: int, ne: int) -> tuple[np.ndarray, np.ndarray]:
    """Conductance matrix of the first ``nk`` nets with the last ``ne`` eliminated.

    Returns ``(G, R)``: ``G = Gkk - Gke Gee^-1 Gek`` (GMIN on every net) and
    ``R = -Gee^-1 Gek`` that recovers the eliminated voltages.
    """
    r = np.concatenate((ri, rj, ri, rj))
    c = np.concatenate((ri, rj, rj, ri))
    v = np.concatenate((g, g, -g, -g))
    kk = (r < nk) & (c < nk)
    Gkk = np.zeros((nk, nk))
    np.add.at(Gkk, (r[kk], c[kk]), v[kk])
    Gkk[np.diag_indices(nk)] += GMIN
    if not ne:
        return Gkk, np.zeros((0, nk))
    ek = (r >= nk) & (c < nk)
    Gek = np.zeros((ne, nk))
    np.add.at(Gek, (r[ek] - nk, c[ek]), v[ek])
    ee = (r >= nk) & (c >= nk)
    d = np.arange(ne)
    Gee = sp.coo_matrix(
        (np.concatenate((v[ee], np.full(ne, GMIN))), (np.concatenate((r[ee] - nk, d)), np.concatenate((c[ee] - nk, d)))),
        shape=(ne, ne),
    ).tocsc()
    if ne <= 64:
        X = sla.cho_solve(sla.cho_factor(Gee.toarray()), Gek)
    else:
        X = spla.splu(Gee).solve(Gek)
    G = Gkk - Gek.T @ X
    return 0.5 * (G + G.T), -X


def _prune(items: list[list], probes: set[str], parent: dict[str, str], coupled: set[str]) -> list[list]:
    """Remove dangling branches repeatedly; ``parent`` records where each went.

    A net is dangling when it is not probed and all its branches lead to one
    other net: no current can enter it, so (starting discharged, with every
    junction passing zero current at zero volts) it stays at that net's
    voltage. A coupled inductor among them could be driven magnetically, and
    a controlled source (transistor action) forces a current, so such nets stay.
    """
    ends: dict[str, set[int]] = defaultdict(set)
    for k, it in enumerate(items):
        ends[it[1]].add(k)
        ends[it[2]].add(k)
    removed = [False] * len(items)

    def leaf_of(net: str) -> str | None:
        others = set()
        for k in ends[net]:
            it = items[k]
            if (it[0] == "L" and it[4] in coupled) or it[0] == "G":
                return None  # driven magnetically, or a controlled source
            others.add(it[2] if it[1] == net else it[1])
        return next(iter(others)) if len(others) == 1 else None

    queue = [n for n in ends if n not in probes]
    while queue:
        net = queue.pop()
        if net in parent or not ends[net]:
            continue
        other = leaf_of(net)
        if other is None or other == net:
            continue
        for k in ends[net]:
            removed[k] = True
            ends[other].discard(k)
        ends[net] = set()
        parent[net] = other
        if other not in probes:
            queue.append(other)
    return [it for k, it in enumerate(items) if not removed[k]]
