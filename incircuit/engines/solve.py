"""Closed-form solution of ``C x' + G x + A i = b``, ``Lm i' = A^T x`` between events.

Coordinates. Nets without capacitance, and the common mode of each island
of capacitors with no capacitance to the tester's ground, are algebraic:
:func:`make_split` writes ``x = Tr y + Tn w`` where ``y`` holds the voltages
of capacitive nets (relative to one reference net per floating island) and
``w`` the algebraic rest, so that ``Tr^T C Tr = Cr`` is positive definite and
``C Tn = 0``. The algebraic rows give ``w = H (Tn^T b - Gnr y - An i)`` with
``H = Gnn^-1``; substituting leaves

    Cr y' = -S y - K i + P^T b,     S = Grr - Grn H Gnr,
    Lm i' =  K^T y - An^T H An i + An^T H Tn^T b,   K = Ar - Grn H An.

Without inductors ``S phi = lambda Cr phi`` is a symmetric generalized
eigenproblem (real decaying modes, :class:`Modal` via ``eigh``). With
inductors the state ``z = (y, i)`` obeys ``z' = F z + g`` and ``F`` is
diagonalised by ``eig``; when its eigenvectors are ill-conditioned the
matrix exponential of the augmented matrix ``[[F, g], [0, 0]]`` is used
instead (:class:`Exponential`). In modal form every net voltage is

    x(t) = Xc b + Re M (e^{lambda t} zeta0 + t phi1(lambda t) gamma),
    phi1(u) = (e^u - 1) / u,

which also holds for a zero eigenvalue (a loop of inductors).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable
from functools import cached_property

import numpy as np
import scipy.linalg as sla
from scipy.optimize import brentq
from scipy.sparse.csgraph import connected_components, minimum_spanning_tree

__all__ = ["Split", "cap_islands", "make_split", "Static", "Modal", "Exponential", "decompose", "first_event", "time_grid"]

#: Above this condition number of the eigenvector matrix the matrix
#: exponential replaces the modal sum.
EIG_COND_MAX = 1e8
#: Grid points evaluated at once by the first event search (doubling after each chunk).
CHUNK = 16


@dataclass(frozen=True)
class Split:
    """Dynamic/algebraic coordinates: ``x = Tr y + Tn w``, ``y = Lsel x``.

    ``Linv`` is the inverse Cholesky factor of ``Cr`` (``Linv Cr Linv^T = I``),
    which turns the generalized eigenproblem into a standard one.
    """

    Tr: np.ndarray
    Tn: np.ndarray
    Lsel: np.ndarray
    Cr: np.ndarray
    Linv: np.ndarray

    @cached_property
    def Crinv(self) -> np.ndarray:
        """``Cr^-1 = Linv^T Linv`` (computed once per split)."""
        return self.Linv.T @ self.Linv


def cap_islands(C: np.ndarray, grounded: np.ndarray) -> list[tuple[np.ndarray, bool, list[tuple[int, int]]]]:
    """Groups of nets joined by capacitors: ``(members, floats, tree)``.

    ``floats``: no capacitance to the tester's ground. ``tree``: the edges
    (local indices; ``len(members)`` stands for the tester's ground) of a
    spanning tree of largest capacitances (Kruskal's tree for weights 1/C).
    """
    cap = np.flatnonzero(np.diag(C) > 0)
    if not len(cap):
        return []
    ncomp, labels = connected_components(C[np.ix_(cap, cap)] != 0, directed=False)
    out = []
    for c in range(ncomp):
        members = cap[labels == c]
        k = len(members)
        floating = not grounded[members].any()
        w = np.zeros((k + 1, k + 1))
        sub = -C[np.ix_(members, members)]
        np.fill_diagonal(sub, 0.0)
        pos = sub > 0
        w[:k, :k][pos] = 1.0 / sub[pos]
        if not floating:
            stray = C[members].sum(axis=1)
            g = grounded[members] & (stray > 0)
            w[:k, k][g] = 1.0 / stray[g]
        tree = minimum_spanning_tree(w).tocoo()
        out.append((members, floating, list(zip(tree.row.tolist(), tree.col.tolist()))))
    return out


def make_split(
    C: np.ndarray,
    grounded: np.ndarray,
    anchor: np.ndarray | None = None,
    islands: list | None = None,
) -> Split:
    """Coordinates for capacitance matrix ``C`` (``grounded``: nets with capacitance to ground).

    The dynamic coordinates are the voltages across the branches of each
    island's tree of largest capacitances (:func:`cap_islands`), rooted at
    the tester's ground or, for a floating island, at its member with the
    largest ``anchor`` (its conductance to everything else), whose voltage
    is the island's algebraic common mode. A large capacitor then gets a
    coordinate of its own instead of sharing two with small ones, which
    keeps ``Cr`` well conditioned (after diagonal scaling), and eliminating
    the common mode subtracts small numbers from small ones.

    >>> C = np.array([[2.0, -1.0, 0.0], [-1.0, 1.0, 0.0], [0.0, 0.0, 0.0]])
    >>> s = make_split(C, np.array([True, False, False]))
    >>> s.Tr.shape, s.Tn.shape
    ((3, 2), (3, 1))
    """
    n = len(C)
    if islands is None:
        islands = cap_islands(C, grounded)
    tr_cols: list[np.ndarray] = []
    l_rows: list[tuple[int, int]] = []
    tn_ind: list[np.ndarray] = []
    for members, floating, tree in islands:
        k = len(members)
        if floating:
            root = int(0 if anchor is None else np.argmax(anchor[members]))
            tn_ind.append(members)
        else:
            root = k
        adj: list[list[int]] = [[] for _ in range(k + 1)]
        for a, b in tree:
            adj[a].append(b)
            adj[b].append(a)
        parent = [-1] * (k + 1)
        order = [root]
        parent[root] = root
        for v in order:
            for u in adj[v]:
                if parent[u] == -1:
                    parent[u] = v
                    order.append(u)
        below: dict[int, list[int]] = {}
        for v in reversed(order[1:]):
            nodes = below.pop(v, []) + [v]
            below.setdefault(parent[v], []).extend(nodes)
            col = np.zeros(n)
            col[members[nodes]] = 1.0
            tr_cols.append(col)
            l_rows.append((int(members[v]), -1 if parent[v] == k else int(members[parent[v]])))
    alg = np.flatnonzero(np.diag(C) <= 0)
    nr, na = len(tr_cols), len(tn_ind) + len(alg)
    Tr = np.array(tr_cols).T.reshape(n, nr)
    Lsel = np.zeros((nr, n))
    for row, (v, p) in enumerate(l_rows):
        Lsel[row, v] = 1.0
        if p >= 0:
            Lsel[row, p] = -1.0
    Tn = np.zeros((n, na))
    for j, members in enumerate(tn_ind):
        Tn[members, j] = 1.0
    Tn[alg, len(tn_ind) + np.arange(len(alg))] = 1.0
    Cr = Tr.T @ C @ Tr
    if nr:
        d = 1.0 / np.sqrt(np.diag(Cr))
        Linv = np.linalg.inv(np.linalg.cholesky(Cr * np.outer(d, d))) * d
    else:
        Linv = np.zeros((0, 0))
    return Split(Tr, Tn, Lsel, Cr, Linv)


class Static:
    """The algebraic part for one conductance matrix ``G``: the instantaneous solution."""

    def __init__(self, split: Split, G: np.ndarray, A: np.ndarray):
        Tr, Tn = split.Tr, split.Tn
        self.split = split
        self.G = G
        self.A = A
        GTn = G @ Tn
        Gnn = Tn.T @ GTn
        self.Grn = Tr.T @ GTn
        self.An = Tn.T @ A
        if Gnn.size:
            self.H = np.linalg.inv(Gnn)
            self.H = 0.5 * (self.H + self.H.T)
        else:
            self.H = np.zeros((0, 0))
        TnH = Tn @ self.H
        #: x = P y + Pi i + Xc b
        self.P = Tr - TnH @ self.Grn.T
        self.Pi = -TnH @ self.An
        self.Xc = TnH @ Tn.T

    def instant(self, x: np.ndarray, i: np.ndarray, b: np.ndarray) -> np.ndarray:
        """Net voltages with the dynamic part of ``x`` and currents ``i`` held."""
        return self.P @ (self.split.Lsel @ x) + self.Pi @ i + self.Xc @ b


class Modal:
    """Modal form ``x(t) = Xc b + Re M (e^{lam t} zeta0 + t phi1(lam t) gamma)``."""

    def __init__(self, st: Static, Lm: np.ndarray, Lminv: np.ndarray | None = None):
        sp_ = st.split
        Cr = sp_.Cr
        nr, m = Cr.shape[0], Lm.shape[0]
        S = sp_.Tr.T @ st.G @ sp_.Tr - st.Grn @ st.H @ st.Grn.T
        S = 0.5 * (S + S.T)
        self.Xc = st.Xc
        if m == 0:
            if nr:
                lam, U = np.linalg.eigh(sp_.Linv @ S @ sp_.Linv.T)
                Phi = sp_.Linv.T @ U  # Phi^T Cr Phi = I, S Phi = Cr Phi diag(lam)
            else:
                lam, Phi = np.zeros(0), np.zeros((0, 0))
            self.lam = -lam
            self.M = st.P @ Phi
            self.Wx = Phi.T @ Cr @ sp_.Lsel
            self.Wi = np.zeros((nr, 0))
            self.Gam = self.M.T.copy()
            self.Mi = np.zeros((0, nr))
            self.real = True
            self.ok = True
            return
        Ar = sp_.Tr.T @ st.A
        HAn = st.H @ st.An
        K = Ar - st.Grn @ HAn
        D = st.An.T @ HAn
        # E = blockdiag(Cr, Lm): invert by blocks (Cr^-1 = Linv^T Linv)
        Crinv = sp_.Crinv
        if Lminv is None:
            Lminv = np.linalg.inv(Lm)
        self.F = -np.vstack([Crinv @ np.hstack([S, K]), Lminv @ np.hstack([-K.T, D])])
        self.gmap = np.vstack([Crinv @ st.P.T, Lminv @ (HAn.T @ sp_.Tn.T)])
        self.Cz = np.hstack([st.P, st.Pi])
        self.nr = nr
        lam, V = np.linalg.eig(self.F)
        self._adopt(lam, V, sp_, _one_norm_conditioned)

    def _adopt(self, lam: np.ndarray, V: np.ndarray, sp_: Split,
               conditioned: Callable[[np.ndarray, np.ndarray], bool]) -> None:
        """Take the eigenpairs ``lam, V`` of ``F`` as the modal basis when
        ``conditioned(V, V^-1)`` holds; otherwise ``ok`` stays False and the
        caller falls back to the matrix exponential."""
        self.real = False
        self.ok = False
        try:
            Vinv = np.linalg.inv(V) if len(V) else V
        except np.linalg.LinAlgError:
            return
        self.ok = conditioned(V, Vinv)
        if not self.ok:
            return
        nr = self.nr
        self.lam = lam
        self.M = self.Cz @ V
        self.Mi = V[nr:, :]
        self.Wx = Vinv[:, :nr] @ sp_.Lsel
        self.Wi = Vinv[:, nr:]
        self.Gam = Vinv @ self.gmap

    def start(self, x0: np.ndarray, i0: np.ndarray, b: np.ndarray) -> "ModalTrajectory":
        zeta = self.Wx @ x0 + self.Wi @ i0
        gam = self.Gam @ b
        return ModalTrajectory(self, zeta, gam, self.Xc @ b)


def _one_norm_conditioned(V: np.ndarray, Vinv: np.ndarray) -> bool:
    """1-norm condition number of the eigenvectors (within a factor N of the
    2-norm one) below ``EIG_COND_MAX``."""
    cond = np.abs(V).sum(axis=0).max() * np.abs(Vinv).sum(axis=0).max()
    return bool(np.isfinite(cond) and cond < EIG_COND_MAX)


def _phi_t(lam: np.ndarray, t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``e^{lam t}`` and ``t phi1(lam t)`` for times ``t`` (rows) and modes (columns)."""
    u = np.multiply.outer(t, lam)
    ex = np.exp(u)
    safe = np.where(lam == 0, 1.0, lam)
    tp = np.where(lam == 0, t[:, None] + 0 * u, np.expm1(u) / safe)
    return ex, tp


class ModalTrajectory:
    """The closed-form solution from one starting state."""

    def __init__(self, dec: Modal, zeta: np.ndarray, gam: np.ndarray, const: np.ndarray):
        self.dec = dec
        self.zeta = zeta
        self.gam = gam
        self.const = const

    @property
    def rates(self) -> np.ndarray:
        return self.dec.lam

    def combo(self, W: np.ndarray, level: np.ndarray, horizon: float = np.inf) -> "Combo":
        """Scalar functions ``W x(t) - level`` (one per row of ``W``) for ``t <= horizon``."""
        WM = W @ self.dec.M
        return Combo(self.dec.lam, WM * self.zeta, WM * self.gam, W @ self.const - level, self.dec.real, horizon)

    def nets(self, t: np.ndarray) -> np.ndarray:
        ex, tp = _phi_t(self.dec.lam, np.asarray(t, dtype=float))
        modal = ex * self.zeta + tp * self.gam
        out = modal @ self.dec.M.T
        return self.const + (out.real if not self.dec.real else out)

    def state(self, t: float) -> tuple[np.ndarray, np.ndarray]:
        ex, tp = _phi_t(self.dec.lam, np.array([t]))
        modal = (ex * self.zeta + tp * self.gam)[0]
        x = self.const + (self.dec.M @ modal).real
        i = (self.dec.Mi @ modal).real
        return x, i


def _tphi(lam: np.ndarray, t) -> np.ndarray:
    """``t phi1(lam t) = (e^{lam t} - 1) / lam`` (``t`` where ``lam = 0``), accurate for small ``lam t``."""
    u = np.multiply.outer(t, lam)
    zero = lam == 0
    if not zero.any():
        return np.expm1(u) / lam
    return np.where(zero, np.multiply.outer(t, np.ones(len(lam))), np.expm1(u) / np.where(zero, 1.0, lam))


class Combo:
    """``c + Re(sum_k p_k e^{lam_k t} + q_k t phi1(lam_k t))`` for several rows.

    For speed the modes that die out within ``horizon`` (``|lam| horizon >=
    30``) are folded into ``c' + sum_k a_k e^{lam_k t}`` with ``a = p + q/lam``.
    The others keep the ``t phi1`` form: folding them would add and subtract
    ``q/lam``, which for a slow mode can be far larger than the function
    itself and leave rounding errors of nanovolts (enough to make a junction
    chatter at a knot).
    """

    SLOW = 30.0

    def __init__(self, lam, p, q, c, real: bool, horizon: float = np.inf):
        slow = np.abs(lam) * horizon < self.SLOW
        if slow.any():
            fast = ~slow
            lf = lam[fast]
            qf = q[:, fast] / lf
            a = p[:, fast] + qf
        else:
            lf = lam
            qf = q / lf
            a = p + qf
        self.c = c - qf.sum(axis=1).real
        if np.iscomplexobj(lf):
            # a real matrix has conjugate pairs with conjugate coefficients:
            # Re(a e^{lam t} + conj) = 2 Re(a e^{lam t}); keep Im(lam) >= 0 only
            upper = lf.imag >= 0
            a = a[:, upper] * np.where(lf[upper].imag > 0, 2.0, 1.0)
            lf = lf[upper]
        self.lf, self.a = lf, a
        self.ls, self.ps, self.qs = lam[slow], p[:, slow], q[:, slow]
        self.real = real and not np.iscomplexobj(self.a) and not np.iscomplexobj(self.ps)

    def ringing(self) -> np.ndarray:
        """Mask of the ringing modes with at least 1 % of some row's total swing."""
        if not np.iscomplexobj(self.lf) or not len(self.lf):
            return np.zeros(len(self.lf), dtype=bool)
        amp = np.abs(self.a)
        share = amp / np.maximum(amp.sum(axis=1, keepdims=True), 1e-300)
        return (share >= 1e-2).any(axis=0) & (self.lf.imag > 0)

    def __call__(self, t: np.ndarray) -> np.ndarray:
        t = np.asarray(t, dtype=float)
        out = np.exp(np.multiply.outer(t, self.lf)) @ self.a.T
        if len(self.ls):
            out = out + np.exp(np.multiply.outer(t, self.ls)) @ self.ps.T + _tphi(self.ls, t) @ self.qs.T
        return self.c + (out if self.real else out.real)

    def reachable(self, horizon: float) -> np.ndarray:
        """Rows that can reach 0 within ``[0, horizon]``, by the bound
        ``c + sum |a_k| max(1, e^{Re lam_k horizon})``; for the slow modes
        ``|p| e^{..} + |q| horizon e^{..}`` (as ``|t phi1(lam t)| <= t e^{max(Re lam, 0) t}``)."""
        grow = np.exp(np.maximum(self.lf.real, 0.0) * horizon)
        bound = self.c + np.abs(self.a) @ grow
        if len(self.ls):
            gs = np.exp(np.maximum(self.ls.real, 0.0) * horizon) * (1 + 1e-9)
            bound = bound + np.abs(self.ps) @ gs + np.abs(self.qs) @ (gs * horizon)
        return bound >= 0

    def subset(self, rows: np.ndarray) -> "Combo":
        """The same functions for ``rows`` only."""
        out = object.__new__(Combo)
        out.lf, out.a, out.c = self.lf, self.a[rows], self.c[rows]
        out.ls, out.ps, out.qs = self.ls, self.ps[rows], self.qs[rows]
        out.real = self.real
        return out

    def row(self, k: int):
        lf, a, c = self.lf, self.a[k], float(self.c[k])
        ls, ps, qs = self.ls, self.ps[k], self.qs[k]
        if not len(ls):
            if self.real:
                return lambda t: c + float(a @ np.exp(lf * t))
            return lambda t: c + float((a @ np.exp(lf * t)).real)

        zero = ls == 0
        if zero.any():
            def f(t: float) -> float:
                v = a @ np.exp(lf * t) + ps @ np.exp(ls * t) + qs @ _tphi(ls, t)
                return c + float(v.real)
        else:
            def f(t: float) -> float:  # _tphi inlined for a scalar t (same operations)
                u = ls * t
                v = a @ np.exp(lf * t) + ps @ np.exp(u) + qs @ (np.expm1(u) / ls)
                return c + float(v.real)

        return f


class Exponential:
    """Fallback for defective or near-defective state matrices: ``expm`` of the augmented matrix."""

    def __init__(self, st: Static, modal: Modal):
        self.F, self.gmap, self.Cz, self.Xc = modal.F, modal.gmap, modal.Cz, modal.Xc
        self.Lsel = st.split.Lsel
        self.nr = modal.nr
        lam = np.linalg.eigvals(self.F)
        self.lam = lam

    def start(self, x0: np.ndarray, i0: np.ndarray, b: np.ndarray) -> "ExpTrajectory":
        return ExpTrajectory(self, np.concatenate([self.Lsel @ x0, i0]), self.gmap @ b, self.Xc @ b)


class ExpTrajectory:
    def __init__(self, dec: Exponential, z0: np.ndarray, g: np.ndarray, const: np.ndarray):
        N = len(z0)
        aug = np.zeros((N + 1, N + 1))
        aug[:N, :N] = dec.F
        aug[:N, N] = g
        self.aug = aug
        self.v0 = np.concatenate([z0, [1.0]])
        self.dec = dec
        self.const = const

    @property
    def rates(self) -> np.ndarray:
        return self.dec.lam

    def _z(self, t: float) -> np.ndarray:
        return (sla.expm(self.aug * t) @ self.v0)[:-1]

    def nets(self, t: np.ndarray) -> np.ndarray:
        return np.array([self.const + self.dec.Cz @ self._z(tt) for tt in np.atleast_1d(t)]).reshape(-1, len(self.const))

    def state(self, t: float) -> tuple[np.ndarray, np.ndarray]:
        z = self._z(t)
        return self.const + self.dec.Cz @ z, z[self.dec.nr :]

    def combo(self, W: np.ndarray, level: np.ndarray, horizon: float = np.inf) -> "ExpCombo":
        return ExpCombo(self, W, level)


class ExpCombo:
    def __init__(self, traj: ExpTrajectory, W: np.ndarray, level: np.ndarray):
        self.traj, self.W, self.level = traj, W, level

    def __call__(self, t: np.ndarray) -> np.ndarray:
        return self.traj.nets(t) @ self.W.T - self.level

    def row(self, k: int):
        return lambda t: float(self(np.array([t]))[0, k])


def decompose(st: Static, Lm: np.ndarray, Lminv: np.ndarray | None = None) -> Modal | Exponential:
    """The modal form, or the matrix-exponential fallback when eigenvectors are ill-conditioned.

    ``Lminv``: ``Lm^-1`` when the caller keeps it (a session decomposes many
    times with one ``Lm``)."""
    modal = Modal(st, Lm, Lminv)
    return modal if modal.ok else Exponential(st, modal)


def time_grid(rates: np.ndarray, t_end: float, per_decade: int = 8, max_points: int = 1000) -> np.ndarray:
    """Times in ``[0, t_end]`` fine enough to bracket crossings of a modal sum.

    Log-spaced from a twentieth of the fastest time constant, plus points
    every eighth of a period of each oscillating mode while it lasts (ten
    decay times), within ``max_points`` in all: a fast, lightly damped
    parasitic ringing is followed for its first periods, where it is largest.
    """
    if t_end <= 0:
        return np.array([0.0])
    rates = np.asarray(rates)
    decay = np.abs(rates.real)
    fast = decay.max() if len(decay) else 0.0
    t_lo = max(t_end * 1e-14, 0.05 / fast) if fast > 0 else t_end
    if t_lo >= t_end:
        grid = np.linspace(0.0, t_end, 9)
    else:
        span = np.log(t_end / t_lo)
        n = int(np.ceil(per_decade * span / np.log(10.0))) + 1
        grid = np.empty(n + 1)
        grid[0] = 0.0
        # np.linspace(0, span, n), without its overhead (the last point is set below)
        grid[1:] = t_lo * np.exp(np.arange(n) * (span / (n - 1)))
        grid[-1] = t_end
    if not np.iscomplexobj(rates):
        return grid
    parts = [grid]
    budget = max_points
    for r in rates[rates.imag > 0]:
        period = 2 * np.pi / r.imag
        span_t = min(t_end, 10.0 / decay_or_inf(r.real))
        k = int(min(budget, np.ceil(8 * span_t / period)))
        if k > 2:
            stop = min(span_t, k * period / 8)
            points = np.arange(k + 1) * (stop / k)
            points[-1] = stop
            parts.append(points)
            budget -= k
    return np.unique(np.concatenate(parts)) if len(parts) > 1 else grid


def decay_or_inf(re: float) -> float:
    return abs(re) if re != 0 else 1e-300


def first_event(combo, t_end: float, rates: np.ndarray) -> tuple[float, int] | None:
    """Earliest ``t`` in ``[0, t_end]`` where a row of ``combo`` reaches 0 from below.

    A row already at or above 0 at ``t = 0`` fires at once. Crossings are
    bracketed on :func:`time_grid` and refined with ``brentq``. A row that
    touches 0 only by rounding (the scalar re-evaluation disagrees with the
    grid) is passed over in that interval.
    """
    index = None
    if hasattr(combo, "reachable"):
        index = np.flatnonzero(combo.reachable(t_end))
        if not len(index):
            return None
        combo = combo.subset(index)
    found = _first_event(combo, t_end, rates)
    if found is None or index is None:
        return found
    return found[0], int(index[found[1]])


def _first_event(combo, t_end: float, rates: np.ndarray) -> tuple[float, int] | None:
    if hasattr(combo, "ringing"):
        # decays of all modes; ringing of the slow ones (a few periods at most)
        # and of the fast ones that matter
        ring = combo.ringing()
        rates = np.concatenate((np.where(ring, combo.lf, combo.lf.real), combo.ls))
    grid = time_grid(rates, t_end)
    # the grid is evaluated in chunks of growing length, earliest first: the
    # first event usually comes early, and the chunks give the same brackets
    start, size = 0, CHUNK
    while start < len(grid):
        stop = min(len(grid), start + size)
        found = _search_chunk(combo, grid, start, stop)
        if found is not None:
            return found
        start, size = stop, 2 * size
    return None


def _search_chunk(combo, grid: np.ndarray, start: int, stop: int) -> tuple[float, int] | None:
    """The first crossing bracketed by ``grid[g - 1], grid[g]`` for ``start <= g < stop``."""
    vals = combo(grid[start:stop])
    if vals.size == 0:
        return None
    hit = vals >= 0
    rows_f: dict = {}
    for g in start + np.flatnonzero(hit.any(axis=1)):
        rows = np.flatnonzero(hit[g - start])
        if g == 0:
            return 0.0, int(rows[0])
        a, b = grid[g - 1], grid[g]
        best: tuple[float, int] | None = None
        for k in rows:
            f = rows_f.get(k)
            if f is None:
                f = rows_f[k] = _remembered(combo.row(int(k)))
            fa, fb = f(a), f(b)
            if fb < 0:
                continue
            if fa >= 0:
                t = a
            else:
                t = brentq(f, a, b, xtol=max(b * 1e-13, 1e-300), rtol=1e-13)
                # the root may sit a hair before the crossing; step to where f >= 0
                if f(t) < 0:
                    t = min(b, t + max(abs(t) * 1e-13, 1e-300))
            if best is None or t < best[0]:
                best = (t, int(k))
        if best is not None:
            return best
    return None


def _remembered(f):
    """``f`` that keeps its values: ``brentq`` evaluates the bracket's ends
    again, and the root once more after it."""
    memo: dict = {}

    def g(t: float) -> float:
        v = memo.get(t)
        if v is None:
            v = memo[t] = f(t)
        return v

    return g
