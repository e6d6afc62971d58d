"""Piecewise-linear junctions: a chain of chords fitted to the Shockley curve.

A pn junction with series resistance ``rs`` follows (Sze, *Physics of
Semiconductor Devices*, the ideal-diode equation)

    V(I) = n Vt ln(1 + I / Is) + I rs,        Vt = k T / q,

with T = 300.15 K (27 degC, SPICE's default nominal temperature), so
``Vt = 25.865 mV``. :func:`junction_curve` places knots on that curve at
currents spanning the tester's range and joins them by straight chords; the
chain is monotone, convex on the forward side, continuous, and exact at the
knots. Between knots the chord voltage is low by at most
``chord_error(q) * n * Vt`` for knot current ratio ``q`` (see
:func:`chord_error`): with two knots per decade that is 0.163 n Vt = 4.2 mV
for n = 1. The resistive part ``I rs`` is linear in I and interpolates
exactly.

Knots, from the left:

* reverse breakdown (only when ``bv`` is finite): the same currents,
  negated, on ``V = -bv - n Vt ln(I / ibv) - I rs`` (through ``(-bv, -ibv)``);
* the end of the "off" segment ``V_r = -max(Is / g0, 0.05 n Vt)``: the off
  segment is the chord from the origin to the first forward knot (slope
  ``g0``), continued into reverse until it carries ``Is`` (but at least
  0.05 n Vt = 1.3 mV away from zero). There is no knot at or near 0 V, so
  junctions resting near zero bias (most of an unpowered board) do not
  chatter between segments, and a discharged board stays at rest (the off
  segment passes through the origin). The reverse current is then
  ``max(Is, 0.05 g0 n Vt) + gmin |V|``: Is itself for large-Is parts, a few
  pA for a small-signal silicon diode;
* forward currents 1 nA, 10 nA, 100 nA, then ``per_decade`` per decade from
  1 uA to 1 A (those below ``Is / 10`` are skipped).

Every knot current also includes ``gmin * V`` (SPICE's GMIN across each
junction), which is the slope left of the lowest knot; right of the highest
knot the last chord continues.

>>> c = junction_curve(1e-14, 1.0, 0.0)
>>> round(voltage_at(c, 1e-3), 4) == round(shockley_voltage(1e-3, 1e-14, 1.0), 4)
True
>>> 0 < voltage_at(c, 10e-6) < voltage_at(c, 1e-3)
True
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Mapping

import numpy as np

__all__ = [
    "BOLTZMANN",
    "CHARGE",
    "TEMPERATURE",
    "VT",
    "Curve",
    "junction_curve",
    "diode_curve",
    "shockley_voltage",
    "voltage_at",
    "current_at",
    "chord_error",
    "segments",
]

BOLTZMANN = 1.380649e-23  # J/K, exact (SI 2019)
CHARGE = 1.602176634e-19  # C, exact (SI 2019)
TEMPERATURE = 300.15  # K: 27 degC, SPICE's default nominal temperature (TNOM)
VT = BOLTZMANN * TEMPERATURE / CHARGE  # 25.865 mV

#: The off segment reaches at least this many n Vt into reverse.
_OFF_U = 0.05
#: Forward knot currents below 1 uA (one per decade; the tester hardly sees these).
_LOW_CURRENTS = (1e-9, 1e-8, 1e-7)


@dataclass(frozen=True)
class Curve:
    """A continuous, monotone piecewise-linear I(V).

    ``knots_v``/``knots_i`` are the knots (increasing V). Segment ``s`` runs
    from knot ``s-1`` to knot ``s`` (segment 0 and the last one are open),
    with ``I = g[s] V + i0[s]``.
    """

    knots_v: np.ndarray
    knots_i: np.ndarray
    g: np.ndarray
    i0: np.ndarray

    @property
    def n_segments(self) -> int:
        return len(self.g)

    def bounds(self, s: int) -> tuple[float, float]:
        """``(lo, hi)`` voltages of segment ``s`` (infinite at the ends)."""
        lo = -math.inf if s == 0 else float(self.knots_v[s - 1])
        hi = math.inf if s == len(self.g) - 1 else float(self.knots_v[s])
        return lo, hi

    def segment_of(self, v: float) -> int:
        """The segment holding voltage ``v`` (the upper one at a knot)."""
        return int(np.searchsorted(self.knots_v, v, side="right"))


def shockley_voltage(current: float, is_: float, n: float, rs: float = 0.0) -> float:
    """Exact voltage of the Shockley diode plus ``rs`` at ``current`` (A)."""
    return n * VT * math.log1p(current / is_) + current * rs


def chord_error(q: float) -> float:
    """Largest chord error, in units of ``n Vt``, for knot current ratio ``q``.

    The chord of ``ln I`` between I1 and q*I1 lies below it by at most
    ``ln r - (r - 1) ln q / (q - 1)`` at ``r = (q - 1) / ln q``.

    >>> round(chord_error(10.0), 3), round(chord_error(10 ** 0.5), 4)
    (0.619, 0.1627)
    """
    r = (q - 1.0) / math.log(q)
    return math.log(r) - (r - 1.0) * math.log(q) / (q - 1.0)


def _from_knots(v: list[float], i: list[float], g_left: float) -> Curve:
    kv = np.asarray(v, dtype=float)
    ki = np.asarray(i, dtype=float)
    slopes = np.diff(ki) / np.diff(kv)
    g = np.concatenate(([g_left], slopes, [slopes[-1]]))
    # I = g V + i0 through the knot at each segment's left end (right end for s=0)
    anchor = np.concatenate(([0], np.arange(len(kv))))
    i0 = ki[anchor] - g * kv[anchor]
    s0 = int(np.searchsorted(kv, 0.0, side="right"))
    if 0 < s0 < len(kv) and kv[s0 - 1] < 0.0 < kv[s0]:
        i0[s0] = 0.0  # the off segment passes exactly through the origin: rest is rest
    for arr in (kv, ki, g, i0):
        arr.flags.writeable = False  # shared through the cache
    return Curve(kv, ki, g, i0)


@lru_cache(maxsize=4096)
def junction_curve(
    is_: float,
    n: float = 1.0,
    rs: float = 0.0,
    bv: float = math.inf,
    ibv: float = 1e-3,
    *,
    gmin: float = 1e-12,
    per_decade: int = 2,
    i_max: float = 1.0,
) -> Curve:
    """The piecewise-linear I(V) of a junction (see the module text).

    Parameters are SPICE's diode parameters: saturation current ``is_`` (A),
    emission coefficient ``n``, series resistance ``rs`` (ohm), reverse
    breakdown voltage ``bv`` (V, inf for none) and the current ``ibv`` (A)
    at ``-bv``. Curves are cached by their parameters and must not be
    modified.
    """
    if not (is_ > 0 and n > 0 and rs >= 0):
        raise ValueError(f"bad junction parameters is={is_} n={n} rs={rs}")
    nvt = n * VT
    currents = list(_LOW_CURRENTS) + [
        1e-6 * 10 ** (k / per_decade) for k in range(int(round(per_decade * math.log10(i_max / 1e-6))) + 1)
    ]
    # knots from Is/10 up: the off segment (origin to the first knot) then
    # spans I/Is < 1, where ln(1 + I/Is) is nearly straight (chord error
    # < 0.06 n Vt); from Is up it would reach 0.25 n Vt
    fwd = [c for c in currents if c >= 0.1 * is_ * (1 - 1e-9)]
    v = [shockley_voltage(c, is_, n, rs) for c in fwd]
    # the "off" segment: the chord from the origin to the first forward knot,
    # continued in reverse down to where it carries Is (at least _OFF_U n Vt away)
    g0 = fwd[0] / v[0]
    v_r = -max(is_ / g0, _OFF_U * nvt)
    v = [v_r] + v
    i = [g0 * v_r] + fwd
    if math.isfinite(bv) and bv > 0:
        rev_v, rev_i = [], []
        for c in currents:
            vb = -bv - nvt * math.log(c / ibv) - c * rs
            if vb < v_r - nvt and -c < g0 * v_r:
                rev_v.append(vb)
                rev_i.append(-c)
        v = rev_v[::-1] + v
        i = rev_i[::-1] + i
    i = [c + gmin * x for c, x in zip(i, v)]
    return _from_knots(v, i, gmin)


def diode_curve(params: Mapping[str, float], area: float = 1.0, *, gmin: float = 1e-12) -> Curve:
    """The curve of a SPICE diode model (defaults is=1e-14, n=1, rs=0, bv=inf, ibv=1e-3).

    ``area`` scales ``is`` and ``ibv`` up and ``rs`` down, as in SPICE.
    """
    return junction_curve(
        float(params.get("is", 1e-14)) * area,
        float(params.get("n", 1.0)),
        float(params.get("rs", 0.0)) / area,
        float(params.get("bv", math.inf)),
        float(params.get("ibv", 1e-3)) * area,
        gmin=gmin,
    )


def segments(curve: Curve) -> list[tuple[float, float, float, float]]:
    """``(v_lo, v_hi, g, i0)`` per segment, for reports and other modules."""
    return [(*curve.bounds(s), float(curve.g[s]), float(curve.i0[s])) for s in range(curve.n_segments)]


def current_at(curve: Curve, v: float) -> float:
    """Current (A) of the piecewise-linear curve at voltage ``v``."""
    s = curve.segment_of(v)
    return float(curve.g[s] * v + curve.i0[s])


def voltage_at(curve: Curve, current: float) -> float:
    """Voltage at which the piecewise-linear curve carries ``current`` (A).

    This is what the chain says a junction needs to conduct ``current``,
    e.g. ``voltage_at(diode_curve(model.params), 1e-3)``.
    """
    ki = curve.knots_i
    s = int(np.searchsorted(ki, current, side="right"))
    return float((current - curve.i0[s]) / curve.g[s])
