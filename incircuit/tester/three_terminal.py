"""The identification run with three probes: transistors and their pins.

1. Discharge; then the conduction test (:func:`.conduction.conduction`)
   between every ordered pair of probes, the third floating: six
   directions, each ``junction``, ``linear``, ``capacitive`` or ``open``.
2. A probe that is the anode of junctions to both others (common anode) or
   the cathode of both (common cathode) is a base or a JFET gate:

   * the other two conduct like a resistor both ways (and nothing conducts
     from the drain to the gate the way the pinch-off step biases them):
     the pinch-off step (:func:`.transistor.pinch_off`); a channel that
     pinches off is a **jfet-n** (common anode) or **jfet-p**;
   * else the gain step in both placements of collector and emitter
     (:func:`.transistor.bjt_gain`); the larger gain is the forward one:
     **bjt-npn** (common anode) or **bjt-pnp**.

3. Each junction with the third probe as a gate: the slow gate charge
   (:func:`.transistor.enhancement_threshold`), first as an n channel
   (drain on the cathode: a body diode runs source to drain), then as a
   p channel: **mosfet-n-enh** or **mosfet-p-enh**.
4. A pair that conducts like a resistor both ways with the third probe as
   an insulated gate (no conduction to either, both ways): the pinch-off
   step as n and as p channel, both orientations: **mosfet-n-dep** or
   **mosfet-p-dep**.
5. Nothing of that: two junctions sharing a terminal are a **diode-pair**
   (common anode or cathode); otherwise the two-terminal identification
   between the pair that conducts best (:mod:`.pairs`), or **nothing**.

Values: a bipolar part's ``value`` is hFE (unit "1"), a MOSFET's its gate
threshold and a JFET's its pinch-off voltage (V, gate minus source).
``extra["pins"]`` says which probe found which pin, e.g.
``{"B": 2, "C": 1, "E": 3}``.
"""

from __future__ import annotations

from itertools import permutations

from ..engines.active import broken_channels, channel_checks
from ..engines.base import Session
from ..model import Board, Reading
from .bench import Bench, StepRecord
from .conduction import Direction, Undischargeable, conduction, ensure_discharged
from .pairs import identify_pair
from .profile import Profile
from .transistor import GAIN_MIN, Gain, Threshold, bjt_gain, enhancement_threshold, pinch_off

__all__ = ["run_three_terminal", "analytic_limits", "channel_probed", "TRANSISTOR_KINDS"]

#: Reading kinds of three-terminal parts.
TRANSISTOR_KINDS = ("bjt-npn", "bjt-pnp", "mosfet-n-enh", "mosfet-p-enh", "mosfet-n-dep",
                    "mosfet-p-dep", "jfet-n", "jfet-p")


def run_three_terminal(session: Session, profile: Profile, trace_points: int = 16
                       ) -> tuple[Reading, tuple[StepRecord, ...]]:
    """Identify the part between the session's three probes.

    Returns the reading and every step executed, in order.
    """
    if len(session.probe_nets) != 3:
        raise ValueError(f"three probes needed, not {len(session.probe_nets)}")
    bench = Bench(session, profile, trace_points)
    try:
        reading = _identify(bench)
    except Undischargeable as error:
        reading = Reading("unreadable", extra={"reason": f"could not discharge the part ({error})"})
    return reading, tuple(bench.records)


def channel_probed(board: Board, nets) -> Reading | None:
    """"unreadable", needs ngspice, when the probes sit on the drain, gate
    and source of a MOSFET or JFET: the analytic engine cannot show the
    channel the identification is after (None otherwise)."""
    probed = {str(n).upper() for n in nets}
    for check in channel_checks(board):
        if {check.drain, check.gate, check.source} <= probed and len({check.drain, check.gate, check.source}) == 3:
            return Reading("unreadable", extra={
                "needs": "ngspice",
                "reason": f"the probes sit on {check.part}'s drain, gate and source: the analytic engine "
                          "models no MOSFET or JFET channel (run with --engine ngspice)",
            })
    return None


def analytic_limits(board: Board, reading: Reading, steps) -> Reading:
    """``reading``, or "unreadable" with ``extra["needs"] = "ngspice"`` when
    the run needed a MOSFET or JFET channel, which the analytic engine
    leaves out (:mod:`incircuit.engines.active`): at the end of some step a
    channel's gate passed its threshold with its drain and source apart.
    """
    why = broken_channels(channel_checks(board), steps)
    if not why:
        return reading
    return Reading("unreadable", extra={
        "needs": "ngspice",
        "reason": "; ".join(why) + ": the analytic engine models no MOSFET or JFET channel "
                  "(run with --engine ngspice)",
    })


def _others(c: int) -> tuple[int, int]:
    x, y = (i for i in range(3) if i != c)
    return x, y


def _identify(bench: Bench) -> Reading:
    ensure_discharged(bench, "initial discharge")
    dirs = {(h, lo): conduction(bench, h, lo) for h, lo in permutations(range(3), 2)}
    junction = [k for k, d in dirs.items() if d.kind == "junction"]
    linear = {k for k, d in dirs.items() if d.kind == "linear"}

    commons = []
    for c in range(3):
        x, y = _others(c)
        if (c, x) in junction and (c, y) in junction:
            commons.append((True, c, x, y))
        if (x, c) in junction and (y, c) in junction:
            commons.append((False, c, x, y))
    for n_type, c, x, y in commons:
        if (x, y) in linear and (y, x) in linear and _blocks(dirs, *((x, c) if n_type else (c, x))):
            found = pinch_off(bench, n_type, c, x, y)
            if found is not None:
                return _jfet(found, n_type, dirs)
        gains = [g for g in (bjt_gain(bench, n_type, c, x, y), bjt_gain(bench, n_type, c, y, x)) if g]
        if gains and max(g.hfe for g in gains) >= GAIN_MIN:
            return _bjt(max(gains, key=lambda g: g.hfe), gains, n_type, dirs)

    for a, k in junction:
        (g,) = (i for i in range(3) if i not in (a, k))
        for n_type, drain, source in ((True, k, a), (False, a, k)):
            found = enhancement_threshold(bench, n_type, g, drain, source)
            if found is not None:
                return _mosfet(found, n_type, "enh", dirs)

    for x, y in sorted({tuple(sorted(k)) for k in linear if k[::-1] in linear}):
        (g,) = (i for i in range(3) if i not in (x, y))
        if not all(_blocks(dirs, g, o) and _blocks(dirs, o, g) for o in (x, y)):
            continue  # an insulated gate conducts to nothing
        for n_type in (True, False):
            for drain, source in ((x, y), (y, x)):
                found = pinch_off(bench, n_type, g, drain, source)
                if found is not None:
                    return _mosfet(found, n_type, "dep", dirs)

    if commons:
        return _diode_pair(commons[0], dirs)
    return _fallback(bench, dirs)


def _blocks(dirs: dict[tuple[int, int], Direction], high: int, low: int) -> bool:
    """No DC conduction from ``high`` to ``low``: the pinch-off step may tie
    them to opposite rails (gate and drain) without driving a junction."""
    return dirs[(high, low)].kind in ("open", "capacitive")


# -- readings -----------------------------------------------------------------------


def _vf(dirs: dict[tuple[int, int], Direction], a: int, k: int) -> float | None:
    d = dirs.get((a, k))
    if d is None or d.kind not in ("junction", "linear") or not d.at_low.conducting:
        return None
    return d.at_low.v_end


def _bjt(best: Gain, gains: list[Gain], npn: bool, dirs) -> Reading:
    b, c, e = best.base, best.collector, best.emitter
    a_be, k_be = (b, e) if npn else (e, b)
    a_bc, k_bc = (b, c) if npn else (c, b)
    extra: dict[str, object] = {
        "method": "gain",
        "resolution": best.resolution,
        "pins": {"B": b + 1, "C": c + 1, "E": e + 1},
        "vbe": best.vbe,
        "ib": best.ib,
        "ic": best.ic,
        "vce": best.vce,
        "leakage": best.leakage,
        "saturated": best.saturated,
        "vf_be": _vf(dirs, a_be, k_be),
        "vf_bc": _vf(dirs, a_bc, k_bc),
    }
    others = [g for g in gains if g is not best]
    if others:
        extra["reverse_gain"] = others[0].hfe
    return Reading("bjt-npn" if npn else "bjt-pnp", best.hfe, extra=extra)


def _threshold_extra(found: Threshold, method: str) -> dict[str, object]:
    return {
        "method": method,
        "resolution": found.resolution,
        "pins": {"G": found.gate + 1, "D": found.drain + 1, "S": found.source + 1},
        "threshold_current": found.current,
        **found.extra,
    }


def _mosfet(found: Threshold, n_channel: bool, mode: str, dirs) -> Reading:
    extra = _threshold_extra(found, "gate_charge" if mode == "enh" else "pinch_off")
    a, k = (found.source, found.drain) if n_channel else (found.drain, found.source)
    body = _vf(dirs, a, k)
    if body is not None and dirs[(a, k)].kind == "junction":
        extra["body_diode"] = body
    kind = f"mosfet-{'n' if n_channel else 'p'}-{mode}"
    return Reading(kind, found.volts, extra=extra)


def _jfet(found: Threshold, n_channel: bool, dirs) -> Reading:
    extra = _threshold_extra(found, "pinch_off")
    extra["drain_source_interchangeable"] = True
    g, s = found.gate, found.source
    extra["gate_junction"] = _vf(dirs, g, s) if n_channel else _vf(dirs, s, g)
    return Reading("jfet-n" if n_channel else "jfet-p", found.volts, extra=extra)


def _diode_pair(common: tuple[bool, int, int, int], dirs) -> Reading:
    anode, c, x, y = common
    pairs = [(c, x), (c, y)] if anode else [(x, c), (y, c)]
    volts = {f"{a + 1}-{k + 1}": _vf(dirs, a, k) for a, k in pairs}
    first = next((v for v in volts.values() if v is not None), None)
    key = "common_anode" if anode else "common_cathode"
    return Reading("diode-pair", first, extra={"method": "junction", key: c + 1, "forward_volts": volts,
                                               "pins": {"A" if anode else "K": c + 1}})


#: Order in which a pair's conduction ranks for the two-terminal reading.
_RANK = {"junction": 0, "linear": 0, "capacitive": 1, "open": 2}


def _fallback(bench: Bench, dirs: dict[tuple[int, int], Direction]) -> Reading:
    """The two-terminal reading of the pair that conducts best."""
    def score(pair: tuple[int, int]) -> tuple:
        both = [dirs[pair], dirs[pair[::-1]]]
        rank = min(_RANK[d.kind] for d in both)
        strongest = max((d.at_low.current for d in both), default=0.0)
        return (rank, -strongest, pair)

    a, b = min(((0, 1), (0, 2), (1, 2)), key=score)
    if min(_RANK[dirs[(a, b)].kind], _RANK[dirs[(b, a)].kind]) == _RANK["open"]:
        ensure_discharged(bench)
        return Reading("nothing")
    return identify_pair(bench, a, b)
