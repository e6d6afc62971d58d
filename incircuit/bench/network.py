"""Nodal analysis of a whole board as a bench instrument sees it.

A bench instrument touches two nets (three with a guard); the rest of the
board floats. :class:`Network` builds the nodal admittance matrix of the
board's linear elements at one angular frequency (modified nodal analysis
reduced to node voltages, e.g. Horowitz & Hill, *The Art of Electronics*,
3rd ed., ch. 1 and appendix on network analysis):

* R: ``1/R``; C: ``j w C`` (open at DC); L: ``1/(j w L)`` with mutual
  coupling through the inverse inductance matrix; at DC inductors are
  shorts, so their nets are merged;
* channels that conduct at zero gate bias: their conductance;
* junctions: either their zero-bias small-signal model ``Is/(n Vt) +
  j w Cj0`` (``small_signal=True``) or left out, for a DC solve that adds
  the Shockley current (:meth:`Network.solve_dc`).

Every node gets ``GMIN`` to the reference so that floating islands stay
determinate (the same device SPICE uses); it is far below any real path.

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 1e3), Part("C1", "C", ("A", "B"), 1e-6)))
>>> z = Network(b, 2 * math.pi * 1e3).impedance("A", "B")
>>> round(abs(z), 1)   # R || 1/(jwC): 1 kohm beside 159 ohm
157.2
"""

from __future__ import annotations

import math
from typing import Mapping, Sequence

import numpy as np

from ..circuit import elements
from ..model import Board
from .junctions import Junction, channels, junctions

__all__ = ["Network", "GMIN", "SHORT_OHMS"]

#: Conductance from every node to the reference (S), as SPICE's gmin.
GMIN = 1e-12
#: A resistor below this is treated as a wire (ohm).
SHORT_OHMS = 1e-6

# Newton iteration of the DC solve
_MAX_STEP = 0.1      # largest change of any junction voltage per iteration (V)
_MAX_ITER = 400
_VTOL = 1e-9


class _Merge:
    """Union-find over net names (nets joined by wires at DC)."""

    def __init__(self) -> None:
        self.parent: dict[str, str] = {}

    def find(self, x: str) -> str:
        self.parent.setdefault(x, x)
        while self.parent[x] != x:
            self.parent[x] = self.parent[self.parent[x]]
            x = self.parent[x]
        return x

    def union(self, a: str, b: str) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra != rb:
            self.parent[max(ra, rb)] = min(ra, rb)


class Network:
    """The board's nodal admittance matrix at angular frequency ``omega``.

    ``omega == 0`` is DC: capacitors open, inductors shorts. Junctions enter
    as their zero-bias small-signal model when ``small_signal`` is true and
    are left to :meth:`solve_dc` otherwise.
    """

    def __init__(self, board: Board, omega: float, small_signal: bool = True):
        circuit = elements(board)
        self.omega = float(omega)
        self.junctions: tuple[Junction, ...] = junctions(circuit)
        merge = _Merge()
        for net in circuit.nets:
            merge.find(net)
        for net in board.nets:
            merge.find(net)
        for e in circuit.elements:
            wire = (e.kind == "R" and abs(e.value or 0.0) < SHORT_OHMS) or (e.kind == "L" and not e.value)
            if wire or (e.kind == "L" and self.omega == 0.0):
                merge.union(e.nodes[0], e.nodes[1])
        roots = sorted({merge.find(n) for n in merge.parent})
        self.index: dict[str, int] = {n: roots.index(merge.find(n)) for n in merge.parent}
        size = len(roots)
        y = np.zeros((size, size), dtype=complex)

        def stamp(a: str, b: str, adm: complex) -> None:
            i, k = self.index[a], self.index[b]
            if i == k:
                return
            y[i, i] += adm
            y[k, k] += adm
            y[i, k] -= adm
            y[k, i] -= adm

        w = self.omega
        inductors = []
        for e in circuit.elements:
            if e.kind == "R" and abs(e.value or 0.0) >= SHORT_OHMS:
                stamp(e.nodes[0], e.nodes[1], 1.0 / float(e.value))  # type: ignore[arg-type]
            elif e.kind == "C" and w > 0 and e.value:
                stamp(e.nodes[0], e.nodes[1], 1j * w * float(e.value))
            elif e.kind == "L" and w > 0 and e.value:
                inductors.append(e)
        if inductors:
            self._stamp_inductors(y, inductors, circuit.couplings, w)
        for c in channels(circuit):
            stamp(c.drain, c.source, c.conductance)
        if small_signal:
            for j in self.junctions:
                stamp(j.anode, j.cathode, j.conductance() + 1j * w * j.capacitance)
        y[np.diag_indices(size)] += GMIN
        self.matrix = y if w > 0 else y.real.copy()
        self.small_signal = small_signal

    def _stamp_inductors(self, y: np.ndarray, inductors: list, couplings: Sequence, w: float) -> None:
        names = [e.name for e in inductors]
        lmat = np.diag([float(e.value) for e in inductors])
        for c in couplings:
            if c.inductors[0] in names and c.inductors[1] in names:
                i, k = names.index(c.inductors[0]), names.index(c.inductors[1])
                m = c.k * math.sqrt(lmat[i, i] * lmat[k, k])
                lmat[i, k] = lmat[k, i] = m
        branch = np.linalg.inv(1j * w * lmat)
        inc = np.zeros((y.shape[0], len(inductors)))
        for col, e in enumerate(inductors):
            inc[self.index[e.nodes[0]], col] += 1.0
            inc[self.index[e.nodes[1]], col] -= 1.0
        y += inc @ branch @ inc.T

    # -- solving -----------------------------------------------------------
    def _split(self, fixed: Mapping[str, float]) -> tuple[list[int], list[int], np.ndarray]:
        known = sorted({self.index[n] for n in fixed})
        free = [i for i in range(self.matrix.shape[0]) if i not in known]
        vk = np.zeros(len(known), dtype=self.matrix.dtype)
        for n, v in fixed.items():
            vk[known.index(self.index[n])] = v
        return known, free, vk

    def solve(self, fixed: Mapping[str, complex], inject: Mapping[str, complex] | None = None
              ) -> tuple[np.ndarray, dict[str, complex]]:
        """Node voltages with ``fixed`` nets held by ideal sources and
        ``inject`` currents (A) into others; also the current each source
        pushes into its net."""
        y = self.matrix
        known, free, vk = self._split(fixed)
        rhs = np.zeros(y.shape[0], dtype=y.dtype)
        for n, i in (inject or {}).items():
            rhs[self.index[n]] += i
        v = np.zeros(y.shape[0], dtype=y.dtype)
        v[known] = vk
        if free:
            a = y[np.ix_(free, free)]
            b = rhs[free] - y[np.ix_(free, known)] @ vk
            v[free] = np.linalg.solve(a, b)
        into = y @ v - rhs
        return v, {n: into[self.index[n]] for n in fixed}

    def impedance(self, a: str, b: str, guard: str | None = None) -> complex:
        """``V(a, b) / I(b)``: 1 V on ``a``, ``b`` at 0 V and the current
        returning through ``b`` measured; a ``guard`` net is held at ``b``'s
        potential, so current through it is not measured."""
        fixed = {a: 1.0, b: 0.0}
        if guard is not None:
            fixed[guard] = 0.0
        if self.index[a] == self.index[b]:
            return 0j
        _, into = self.solve(fixed)
        current = -into[b]
        return complex(np.inf) if current == 0 else 1.0 / complex(current)

    def volts(self, v: np.ndarray, net: str) -> complex:
        return v[self.index[net]]

    def solve_dc(self, fixed: Mapping[str, float], inject: Mapping[str, float] | None = None
                 ) -> tuple[np.ndarray, dict[str, float]]:
        """DC solution with the junctions' Shockley currents (Newton, with
        each junction's voltage step limited so the exponential stays tame).

        Starts from the linear network with junctions open, which is already
        the answer while every junction stays far below its turn-on.
        """
        if self.small_signal or self.omega != 0.0:
            raise ValueError("solve_dc needs Network(board, 0.0, small_signal=False)")
        g = self.matrix
        known, free, vk = self._split(fixed)
        rhs = np.zeros(g.shape[0])
        for n, i in (inject or {}).items():
            rhs[self.index[n]] += i
        jx = [(self.index[j.anode], self.index[j.cathode], j) for j in self.junctions]
        jx = [(a, k, j) for a, k, j in jx if a != k]
        v = np.zeros(g.shape[0])
        v[known] = vk
        for _ in range(_MAX_ITER):
            jac = g.copy()
            f = g @ v - rhs
            for a, k, j in jx:
                x = min((v[a] - v[k]) / j.n_vt, 80.0)
                i = j.saturation * math.expm1(x)
                gd = j.saturation * math.exp(x) / j.n_vt
                f[a] += i
                f[k] -= i
                jac[a, a] += gd
                jac[k, k] += gd
                jac[a, k] -= gd
                jac[k, a] -= gd
            if not free:
                break
            dv = np.linalg.solve(jac[np.ix_(free, free)], -f[free])
            step = np.zeros_like(v)
            step[free] = dv
            worst = max((abs(step[a] - step[k]) for a, k, _ in jx), default=0.0)
            scale = min(1.0, _MAX_STEP / worst) if worst > 0 else 1.0
            v += scale * step
            if scale == 1.0 and np.max(np.abs(dv)) < _VTOL * (1.0 + np.max(np.abs(v))):
                break
        into = g @ v - rhs
        for a, k, j in jx:
            i = j.current(v[a] - v[k])
            into[a] += i
            into[k] -= i
        return v, {n: float(into[self.index[n]]) for n in fixed}
