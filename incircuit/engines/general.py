"""Closed-form solution for a conductance matrix that is not symmetric.

Controlled current sources (a transistor's transport current, see
:mod:`.active`) put unsymmetric entries into ``G``. The coordinates of
:mod:`.solve` still hold (``x = Tr y + Tn w``), but none of its shortcuts
that rest on ``G = G^T`` do: the algebraic rows are solved with
``Gnr = Tn^T G Tr`` rather than ``Grn^T``, and the state matrix is
diagonalised by ``eig`` (never ``eigh``), with the same matrix-exponential
fallback. With ``H = Gnn^-1``:

    w     = H (Tn^T b - Gnr y - An i)
    x     = P y + Pi i + Xc b,     P = Tr - Tn H Gnr, Pi = -Tn H An, Xc = Tn H Tn^T
    Cr y' = -(Grr - Grn H Gnr) y - (Ar - Grn H An) i + (Tr^T - Grn H Tn^T) b
    Lm i' = A^T x

For a symmetric ``G`` this is exactly :class:`.solve.Static` /
:class:`.solve.Modal` (checked in the tests).

>>> import numpy as np
>>> from incircuit.engines.solve import make_split
>>> C = np.diag([1e-9, 0.0])
>>> G = np.array([[1e-3, -1e-3], [-1e-3 + 5e-3, 2e-3 - 5e-3 + 1e-2]])  # a transconductance
>>> st = GeneralStatic(make_split(C, np.array([True, False])), G, np.zeros((2, 0)))
>>> dec = general_decompose(st, np.zeros((0, 0)))
>>> traj = dec.start(np.zeros(2), np.zeros(0), np.array([1e-3, 0.0]))
>>> x_inf = np.linalg.solve(G, [1e-3, 0.0])
>>> bool(np.allclose(traj.state(1.0)[0], x_inf))
True
"""

from __future__ import annotations

import numpy as np

from .solve import EIG_COND_MAX, Exponential, Modal, Split, Static

__all__ = ["GeneralStatic", "GeneralModal", "general_decompose"]


class GeneralStatic(Static):
    """:class:`.solve.Static` for any (invertible on its algebraic part) ``G``."""

    def __init__(self, split: Split, G: np.ndarray, A: np.ndarray):
        Tr, Tn = split.Tr, split.Tn
        self.split = split
        self.G = G
        self.A = A
        Gnn = Tn.T @ G @ Tn
        self.Grn = Tr.T @ G @ Tn
        self.Gnr = Tn.T @ G @ Tr
        self.An = Tn.T @ A
        self.H = np.linalg.inv(Gnn) if Gnn.size else np.zeros((0, 0))
        TnH = Tn @ self.H
        self.P = Tr - TnH @ self.Gnr
        self.Pi = -TnH @ self.An
        self.Xc = TnH @ Tn.T


class GeneralModal(Modal):
    """Modal form of ``E z' = -Ablk z + Bmap b`` by ``eig`` (see the module text)."""

    def __init__(self, st: GeneralStatic, Lm: np.ndarray, Lminv: np.ndarray | None = None):  # noqa: D107 - no super(): all rebuilt
        sp_ = st.split
        Cr = sp_.Cr
        nr, m = Cr.shape[0], Lm.shape[0]
        N = nr + m
        Ar = sp_.Tr.T @ st.A
        GrnH = st.Grn @ st.H
        S = sp_.Tr.T @ st.G @ sp_.Tr - GrnH @ st.Gnr
        K = Ar - GrnH @ st.An
        Bmap = np.vstack([sp_.Tr.T - GrnH @ sp_.Tn.T, st.A.T @ st.Xc])
        self.Xc = st.Xc
        self.nr = nr
        self.Cz = np.hstack([st.P, st.Pi])
        if N:
            # E = blockdiag(Cr, Lm) inverted by blocks (Cr^-1 = Linv^T Linv)
            Ablk = np.empty((N, N))
            Ablk[:nr, :nr] = S
            Ablk[:nr, nr:] = K
            Ablk[nr:, :nr] = -(st.A.T @ st.P)
            Ablk[nr:, nr:] = -(st.A.T @ st.Pi)
            Einv = np.zeros((N, N))
            Einv[:nr, :nr] = sp_.Crinv
            if m:
                Einv[nr:, nr:] = np.linalg.inv(Lm) if Lminv is None else Lminv
            self.F = -(Einv @ Ablk)
            self.gmap = Einv @ Bmap
            lam, V = np.linalg.eig(self.F)
        else:
            self.F = np.zeros((0, 0))
            self.gmap = np.zeros((0, Bmap.shape[1]))
            lam, V = np.zeros(0, dtype=complex), np.zeros((0, 0), dtype=complex)
        self._adopt(lam, V, sp_, _well_conditioned)


def _well_conditioned(V: np.ndarray, Vinv: np.ndarray) -> bool:
    """``cond_2(V) < EIG_COND_MAX``, decided by the cheap 1-norm condition
    number where it settles the question (``cond_2 / N <= cond_1 <= N cond_2``)
    and by the singular values only in between."""
    n = len(V)
    if not n:
        return True
    c1 = np.abs(V).sum(axis=0).max() * np.abs(Vinv).sum(axis=0).max()
    if not np.isfinite(c1):
        return False
    if c1 * n < EIG_COND_MAX:
        return True
    if c1 > n * EIG_COND_MAX:
        return False
    cond = np.linalg.cond(V)
    return bool(np.isfinite(cond) and cond < EIG_COND_MAX)


def general_decompose(st: GeneralStatic, Lm: np.ndarray, Lminv: np.ndarray | None = None) -> GeneralModal | Exponential:
    """The modal form, or the matrix-exponential fallback (as :func:`.solve.decompose`)."""
    modal = GeneralModal(st, Lm, Lminv)
    return modal if modal.ok else Exponential(st, modal)
