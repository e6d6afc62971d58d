"""The identification run: the decision tree over the tester's steps.

1. Discharge (``unreadable`` when the part keeps its charge).
2. Conduction in both polarities, through the low and the high resistor,
   each direction classed capacitive / linear / junction / open
   (:mod:`.conduction`).
3. The kind, in this order:

   * a junction in either direction, or conduction one way only:
     ``diode`` (one direction) or ``diode-pair`` (both); forward voltage
     from the low-resistor pulse, the low-current one from the
     high-resistor pulse, then the reverse-biased junction capacitance;
   * stored charge in either direction, or no conduction at all: the
     capacitance methods; below ``capacitance.min_farads`` ``nothing``;
   * linear both ways: the divider resistance (both polarities); above
     ``resistance.max_ohms`` ``nothing``; polarities that differ by more
     than ``resistance.symmetry_tolerance``: a ``diode`` conducting the
     better way; at most ``inductance.max_ohms`` the current-rise step
     tells an ``inductor`` from a ``resistor``.

Every value is in SI units; ``extra["method"]`` and ``extra["resolution"]``
let :meth:`Profile.accuracy` state the uncertainty.
"""

from __future__ import annotations

import math
from dataclasses import replace

from ..engines.base import Session
from ..model import Reading
from .bench import Bench, StepRecord
from .conduction import Direction, Undischargeable, conduction, ensure_discharged
from .methods import capacitance, inductance, junction_capacitance, resistance
from .profile import Profile

__all__ = ["run_identification"]


def run_identification(session: Session, profile: Profile, trace_points: int = 16
                       ) -> tuple[Reading, tuple[StepRecord, ...]]:
    """Identify the part between the session's two probes.

    Returns the reading and every step executed, in order.
    """
    bench = Bench(session, profile, trace_points)
    try:
        reading = _identify(bench)
    except Undischargeable as error:
        reading = Reading("unreadable", extra={"reason": f"could not discharge the part ({error})"})
    return reading, tuple(bench.records)


def _identify(bench: Bench) -> Reading:
    ensure_discharged(bench, "initial discharge")
    fwd = conduction(bench, 0, 1)
    rev = conduction(bench, 1, 0)
    kinds = (fwd.kind, rev.kind)
    if "junction" in kinds or set(kinds) == {"linear", "open"}:
        return _junctions(bench, fwd, rev)
    if "capacitive" in kinds or kinds == ("open", "open"):
        high, low = (1, 0) if rev.kind == "capacitive" and fwd.kind != "capacitive" else (0, 1)
        return _capacitor(bench, high, low)
    return _resistor(bench, fwd, rev)


def _junctions(bench: Bench, fwd: Direction, rev: Direction) -> Reading:
    on = [d for d in (fwd, rev) if d.kind == "junction"] or [d for d in (fwd, rev) if d.kind == "linear"]
    first = on[0]
    extra: dict[str, object] = {
        "method": "junction",
        "resolution": 2 * first.at_low.lsb,
        "current": first.at_low.current,
    }
    if first.at_high.conducting:
        extra["vf_low_current"] = first.at_high.v_end
        extra["low_current"] = first.at_high.current
    if len(on) == 2:
        second = on[1]
        extra["reverse_volts"] = second.at_low.v_end
        if second.at_high.conducting:
            extra["reverse_volts_low_current"] = second.at_high.v_end
        ensure_discharged(bench)
        return Reading("diode-pair", first.at_low.v_end, extra=extra)
    other = rev if first is fwd else fwd
    extra["anode"] = first.high + 1
    extra["cathode"] = first.low + 1
    if other.kind == "linear":
        extra["reverse_ohms"] = other.apparent_ohms(other.at_high)
    cj = junction_capacitance(bench, first.high, first.low)
    if cj is not None:
        extra["junction_capacitance"] = cj
    return Reading("diode", first.at_low.v_end, extra=extra)


def _capacitor(bench: Bench, high: int, low: int) -> Reading:
    p = bench.profile
    found = capacitance(bench, high, low)
    if found is None:
        return Reading("unreadable", extra={"reason": "capacitance above the fixed-time range"})
    if found.value < p.capacitance_min_farads:
        return Reading("nothing")
    extra = {"method": found.method, "resolution": found.resolution, **found.extra}
    return Reading("capacitor", found.value, extra=extra)


def _estimate(bench: Bench, d: Direction) -> float:
    """Resistance seen by the conduction pulses of one direction."""
    p = bench.profile
    split = math.sqrt(p.probe_ohms(d.low, "low") * p.probe_ohms(d.low, "high"))
    if d.at_low.conducting:
        r = d.apparent_ohms(d.at_low)
        if r < split:
            return r
    if d.at_high.conducting:
        return d.apparent_ohms(d.at_high)
    return math.inf


def _resistor(bench: Bench, fwd: Direction, rev: Direction) -> Reading:
    p = bench.profile
    found = resistance(bench, (_estimate(bench, fwd), _estimate(bench, rev)))
    if not math.isfinite(found.value) or found.value > p.resistance_max_ohms:
        ensure_discharged(bench)
        return Reading("nothing")
    one, two = found.extra["forward_ohms"], found.extra["reverse_ohms"]
    if abs(one - two) > p.resistance_symmetry_tolerance * max(one, two) + 2 * found.resolution:
        # a resistor is symmetric; a path through junctions is not
        if one <= two:
            return _junctions(bench, replace(fwd, kind="junction"), rev)
        return _junctions(bench, fwd, replace(rev, kind="junction"))
    if found.value <= p.inductance_max_ohms:
        coil = inductance(bench, found.value)
        if coil is not None:
            extra = {"method": coil.method, "resolution": coil.resolution, "dc_resistance": found.value,
                     "dc_resistance_resolution": found.resolution, **coil.extra}
            return Reading("inductor", coil.value, extra=extra)
    ensure_discharged(bench)
    extra = {"method": found.method, "resolution": found.resolution, **found.extra}
    return Reading("resistor", found.value, extra=extra)
