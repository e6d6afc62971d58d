"""The analytic engine: closed-form transients of the reduced board, event by event.

Within a step the drive is constant and every junction stays on one segment
of its piecewise-linear curve, so the network is linear and its response
is a sum of exponential modes (:mod:`.solve`). The step is cut at *events*:
a junction voltage leaving its segment (the segment switches and the
solution continues from the state there) or the watch crossing its level
(the step ends). Both are found by root finding on the closed form.

At the start of a step the junction segments are made consistent with the
new drive by following the straight path from the previous state to the
new instantaneous solution and switching a segment each time a junction
voltage meets a knot (Katzenelson's method for piecewise-linear networks;
it terminates because every segment's conductance is positive).

Decompositions are cached per (drive pattern, junction segments) within a
session, so repeated steps cost a few matrix-vector products.

>>> from incircuit.model import Board, Part
>>> from incircuit.engines.base import Source, Watch
>>> board = Board("rc", (Part("R1", "R", ("A", "B"), 1e3), Part("C1", "C", ("B", "0"), 1e-6)))
>>> s = ENGINE.open(board, ("A", "0"), stray=0.0)
>>> r = s.run((Source(1e-9, 5.0), Source(1e-9, 0.0)), 1.0, watch=Watch(0, 1.0), sample_times=[0.0])
>>> r.crossed  # probe A jumps to 5 V at once: the watch fires at t = 0
True
>>> r = s.run((Source(1e-9, 5.0), Source(1e-9, 0.0)), 1e-3)
>>> round(r.nets["B"], 4)  # one time constant: 5 (1 - 1/e)
3.1606
"""

from __future__ import annotations

import contextlib
import math
from typing import Sequence

import numpy as np
from threadpoolctl import ThreadpoolController

from ..circuit import elements
from ..errors import EngineError
from ..model import Board
from .base import Drive, StepResult, Watch
from .branches import from_circuit
from .mna import Network, reduce_network
from .general import GeneralStatic, general_decompose
from .solve import Static, cap_islands, decompose, first_event, make_split

__all__ = ["ENGINE", "AnalyticEngine", "AnalyticSession", "R_MIN", "EPS_V", "MAX_EVENTS", "one_blas_thread"]

#: Smallest drive resistance (ohm); an ideal source is taken as this. Far
#: below any port resistance, yet it keeps the conductance matrix within
#: ~1e15 of GMIN so that double precision holds.
R_MIN = 1e-3
#: Hysteresis (V) beyond a knot before a junction counts as having left its segment.
EPS_V = 1e-9
#: Segment switches allowed in one step before giving up.
MAX_EVENTS = 5000
#: Decompositions kept per session.
CACHE_SIZE = 256

_controller: list = []


def one_blas_thread():
    """Context in which BLAS/LAPACK use one thread.

    The engine's matrices are small (tens of nets): a threaded BLAS only adds
    hand-over costs, and on a busy machine they grow fifty-fold (an eigh of
    40 x 40 took 14 ms threaded against 0.3 ms on one thread, measured).
    """
    if not _controller:
        try:
            _controller.append(ThreadpoolController())
        except Exception:  # noqa: BLE001 - any failure to inspect the libraries: run as is
            _controller.append(None)
    ctl = _controller[0]
    return ctl.limit(limits=1, user_api="blas") if ctl is not None else contextlib.nullcontext()


class AnalyticSession:
    """One board with probes attached (see :class:`incircuit.engines.base.Session`)."""

    def __init__(self, board: Board, probe_nets: Sequence[str], stray: float, *, reduce: bool = True):
        if not probe_nets:
            raise ValueError("at least one probe net is needed")
        if stray < 0:
            raise ValueError(f"negative stray capacitance {stray}")
        self.probe_nets = tuple(probe_nets)
        names = tuple(str(p).upper() for p in probe_nets)
        circuit = elements(board)
        branches = from_circuit(circuit)
        with one_blas_thread():
            self.network: Network = reduce_network(
                branches, names, stray, prune=reduce, eliminate=reduce, board_nets=board.nets
            )
        net = self.network
        self._splits: dict = {}
        self._islands = cap_islands(net.C, net.grounded)
        n = len(net.nets)
        self._x = np.zeros(n)
        self._i = np.zeros(net.A.shape[1])
        self._curves = [c for _, _, c, _ in net.junctions]
        self._seg = [c.segment_of(0.0) for c in self._curves]
        nj = len(net.junctions)
        self._D = np.zeros((nj, n))
        for j, (a, k, _, _) in enumerate(net.junctions):
            self._D[j, a] += 1.0
            self._D[j, k] -= 1.0
        self._Wj = np.vstack((self._D, -self._D))
        self._lo = [np.concatenate(([-np.inf], c.knots_v)) for c in self._curves]
        self._hi = [np.concatenate((c.knots_v, [np.inf])) for c in self._curves]
        # controlled sources (transistor action, see .active): gain times a
        # junction's chord current, from one net to another
        ctrl = net.controlled
        self._ctrl_T = np.zeros((len(ctrl), n))
        for k, (a, b, _, _) in enumerate(ctrl):
            self._ctrl_T[k, a] += 1.0
            self._ctrl_T[k, b] -= 1.0
        self._ctrl_j = np.array([j for _, _, j, _ in ctrl], dtype=int)
        self._ctrl_gain = np.array([gain for _, _, _, gain in ctrl], dtype=float)
        self._statics: dict = {}
        self._decs: dict = {}
        self._Lminv: np.ndarray | None = None
        self._out_names = [p for p in names]

    # -- matrices for one (drive, segments) --------------------------------
    def _split(self, dkey: tuple, gdrive: np.ndarray):
        split = self._splits.get(dkey)
        if split is None:
            net = self.network
            split = make_split(net.C, net.grounded, np.abs(net.G).sum(axis=1) + gdrive, self._islands)
            self._splits[dkey] = split
        return split

    def _static(self, dkey: tuple, gdrive: np.ndarray) -> Static:
        key = (dkey, tuple(self._seg))
        st = self._statics.get(key)
        if st is None:
            G = self.network.G + np.diag(gdrive)
            if self._curves:
                g = np.array([c.g[s] for c, s in zip(self._curves, self._seg)])
                G = G + self._D.T @ (g[:, None] * self._D)
                if len(self._ctrl_j):
                    gm = self._ctrl_gain * g[self._ctrl_j]
                    G = G + self._ctrl_T.T @ (gm[:, None] * self._D[self._ctrl_j])
            kind = GeneralStatic if len(self._ctrl_j) else Static
            st = kind(self._split(dkey, gdrive), G, self.network.A)
            if len(self._statics) >= CACHE_SIZE:
                self._statics.clear()
                self._decs.clear()
            self._statics[key] = st
        return st

    def _decomposition(self, dkey: tuple, gdrive: np.ndarray):
        key = (dkey, tuple(self._seg))
        dec = self._decs.get(key)
        if dec is None:
            st = self._static(dkey, gdrive)
            if self._Lminv is None:
                Lm = self.network.Lm
                self._Lminv = np.linalg.inv(Lm) if len(Lm) else Lm
            dec = (general_decompose if len(self._ctrl_j) else decompose)(st, self.network.Lm, self._Lminv)
            self._decs[key] = dec
        return dec

    def _rhs(self, bdrive: np.ndarray) -> np.ndarray:
        if not self._curves:
            return bdrive
        i0 = np.array([c.i0[s] for c, s in zip(self._curves, self._seg)])
        out = bdrive - self._D.T @ i0
        if len(self._ctrl_j):
            out = out - self._ctrl_T.T @ (self._ctrl_gain * i0[self._ctrl_j])
        return out

    # -- step start: consistent junction segments -------------------------
    def _settle(self, dkey: tuple, gdrive: np.ndarray, bdrive: np.ndarray) -> None:
        limit = 50 + 4 * sum(c.n_segments for c in self._curves)
        for _ in range(limit):
            st = self._static(dkey, gdrive)
            xs = st.instant(self._x, self._i, self._rhs(bdrive))
            if not self._curves:
                self._x = xs
                return
            v0 = self._D @ self._x
            vs = self._D @ xs
            best, move = 1.0, None
            for j, (c, s) in enumerate(zip(self._curves, self._seg)):
                lo, hi = c.bounds(s)
                if vs[j] > hi + EPS_V:
                    tau, step = (hi - v0[j]) / (vs[j] - v0[j]), 1
                elif vs[j] < lo - EPS_V:
                    tau, step = (lo - v0[j]) / (vs[j] - v0[j]), -1
                else:
                    continue
                tau = min(max(tau, 0.0), 1.0)
                if move is None or tau < best:
                    best, move = tau, (j, step)
            if move is None:
                self._x = xs
                return
            self._x = self._x + best * (xs - self._x)
            self._seg[move[0]] += move[1]
        raise EngineError("junction states did not settle", "report the netlist; try the ngspice engine")

    # -- one step -----------------------------------------------------------
    def _drive_vectors(self, drive: Drive) -> tuple[tuple, np.ndarray, np.ndarray]:
        net = self.network
        if len(drive) != len(net.probes):
            raise ValueError(f"drive has {len(drive)} entries for {len(net.probes)} probes")
        n = len(net.nets)
        gdrive = np.zeros(n)
        bdrive = np.zeros(n)
        key = []
        for idx, src in zip(net.probes, drive):
            if src is None:
                key.append(None)
                continue
            if not src.resistance >= 0 or not math.isfinite(src.volts):
                raise ValueError(f"bad source {src}")
            r = max(float(src.resistance), R_MIN)
            key.append(r)
            gdrive[idx] += 1.0 / r
            bdrive[idx] += src.volts / r
        return tuple(key), gdrive, bdrive

    def _events(self, watch: Watch | None) -> tuple:
        """Event functions ``W x - level`` (fire when >= 0) for the current segments.

        Rows: the watch (if any), then each junction's upper knot, then each
        junction's lower knot (an infinite level never fires). Returns the
        combination of the trajectory's modes, ``offset`` (1 with a watch)
        and the rows' matrix ``W``.
        """
        nj = len(self._curves)
        seg = self._seg
        hi = np.array([self._hi[j][s] for j, s in enumerate(seg)]) + EPS_V
        lo = np.array([self._lo[j][s] for j, s in enumerate(seg)]) - EPS_V
        levels = np.concatenate((hi, -lo))
        W = self._Wj
        if watch is not None:
            w = np.zeros(len(self.network.nets))
            w[self.network.probes[watch.probe]] += 1.0
            if watch.minus is not None:
                w[self.network.probes[watch.minus]] -= 1.0
            sign = 1.0 if watch.rising else -1.0
            W = np.vstack((sign * w, W)) if nj else (sign * w)[None, :]
            levels = np.concatenate(([sign * watch.level], levels))
        return W, levels, int(watch is not None)

    def run(
        self,
        drive: Drive,
        duration: float,
        *,
        watch: Watch | None = None,
        sample_times: Sequence[float] = (),
    ) -> StepResult:
        """Simulate ``duration`` seconds under ``drive`` (see :class:`.base.Session`)."""
        if not duration >= 0 or not math.isfinite(duration):
            raise ValueError(f"bad duration {duration}")
        with one_blas_thread():
            return self._run(drive, duration, watch, sample_times)

    def _run(self, drive: Drive, duration: float, watch: Watch | None, sample_times: Sequence[float]) -> StepResult:
        dkey, gdrive, bdrive = self._drive_vectors(drive)
        probes = np.array(self.network.probes)
        ts = np.asarray(sample_times, dtype=float).reshape(-1)
        samples = np.full((len(ts), len(probes)), np.nan)
        filled = np.zeros(len(ts), dtype=bool)
        self._settle(dkey, gdrive, bdrive)
        t, crossed, switches = 0.0, False, 0
        while True:
            dec = self._decomposition(dkey, gdrive)
            traj = dec.start(self._x, self._i, self._rhs(bdrive))
            W, levels, offset = self._events(watch)
            remaining = duration - t
            ev = first_event(traj.combo(W, levels, remaining), remaining, traj.rates) if len(levels) else None
            span = remaining if ev is None else ev[0]
            end = duration if ev is None else t + span
            mask = ~filled & (ts <= end) & (ts >= t)
            if mask.any():
                samples[mask] = traj.nets(np.minimum(ts[mask] - t, span))[:, probes]
                filled |= mask
            self._x, self._i = traj.state(span)
            t = end
            if ev is None:
                break
            k = ev[1] - offset
            if k < 0:
                crossed = True
                break
            nj = len(self._curves)
            self._seg[k % nj] += 1 if k < nj else -1
            switches += 1
            if switches > MAX_EVENTS:
                raise EngineError("too many junction switches in one step", "try the ngspice engine")
        volts = tuple(float(v) for v in self._x[probes])
        return StepResult(t, crossed, volts, samples, self.network.voltages(self._x))


class AnalyticEngine:
    """Closed-form engine; see the module text."""

    name = "analytic"

    def open(self, board: Board, probe_nets: Sequence[str], stray: float, *, reduce: bool = True) -> AnalyticSession:
        """Attach probes to ``probe_nets``; ``reduce=False`` keeps every net (for checks)."""
        return AnalyticSession(board, probe_nets, stray, reduce=reduce)


ENGINE = AnalyticEngine()
