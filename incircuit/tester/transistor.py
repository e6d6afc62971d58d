"""The measurement steps of three-terminal parts: gain, gate threshold, pinch-off.

Each function drives the three probes of a :class:`~.bench.Bench` in one
placement (which probe plays base, collector, gate ...) and returns what
the tester computes, or None when the placement shows no transistor
action. The decision tree that picks placements is
:mod:`.three_terminal`; the tables are in docs/tester-model.md
("Three-terminal parts").

Every timing and detection number is a design choice of incircuit's own
identification sequence and lives in this module's constants; the
hardware (supply, resistors, ADC, timer) comes from the profile. Each
function starts on a discharged part (the conduction steps and every
function here end with a discharge) and leaves it discharged.

>>> round(rc_capacitance(1e-3, 470e3, 5.0, 0.0, 1.6) * 1e9, 3)   # nF; t / (R ln(5 / 3.4))
5.517
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ..engines.base import Watch
from .bench import Bench
from .conduction import ensure_discharged

__all__ = [
    "Gain",
    "Threshold",
    "bjt_gain",
    "enhancement_threshold",
    "pinch_off",
    "rc_capacitance",
    "GAIN_SETTLE_SECONDS",
    "GAIN_MIN",
    "VCE_SATURATED_VOLTS",
    "VBE_MIN_VOLTS",
    "GATE_BIAS_SECONDS",
    "GATE_TIMEOUT_SECONDS",
    "THRESHOLD_DRAIN_AMPS",
    "CONFIRM_FACTOR",
    "PINCH_SETTLE_SECONDS",
    "PINCH_MARGIN_VOLTS",
]

#: Settling wait of a gain step: the base node charges through the high
#: resistor (470 kohm x a few hundred pF of Miller-multiplied junction
#: capacitance and probe stray is well below a millisecond). Design choice.
GAIN_SETTLE_SECONDS = 0.02
#: Below this Ic/Ib the placement shows no transistor action (two junctions
#: sharing a terminal, a diode pair, give ~0). Design choice.
GAIN_MIN = 2.0
#: In the gain step the base-emitter junction must be forward biased by at
#: least this much (germanium transistors run at about 0.2 V, from memory);
#: a collector current that moves without it comes from something else on
#: the board. Design choice.
VBE_MIN_VOLTS = 0.1
#: A collector-emitter voltage below this marks the gain step as saturated:
#: the reading is then a lower bound of the gain (a silicon transistor
#: saturates at about 0.1-0.3 V, common practice). Design choice.
VCE_SATURATED_VOLTS = 0.3
#: Drain held at its rail with the gate held at the source before the gate
#: is charged, so the drain's own charging does not kick the gate. Design choice.
GATE_BIAS_SECONDS = 1e-3
#: Longest slow gate charge through the high resistor: about 45 nF reaches a
#: 4 V threshold in this time (470 kohm, 5 V). Design choice.
GATE_TIMEOUT_SECONDS = 0.05
#: Drain current that marks the gate threshold: the drain drop over the low
#: resistor the tester waits for is this current times that resistor
#: (about 0.18 V). 250 uA is a usual test current of data sheets' gate
#: threshold voltage (from memory). Design choice.
THRESHOLD_DRAIN_AMPS = 250e-6
#: After the threshold, the gate is tied fully on and then off through its
#: port pin: the drain must move by this many times the detection drop
#: between the two, so that a drain that drifts for another reason (a
#: capacitor beside the part charging) is not taken for a channel. Design choice.
CONFIRM_FACTOR = 2.0
#: Settling wait of the pinch-off step (the source charges through the high
#: resistor). Design choice.
PINCH_SETTLE_SECONDS = 0.02
#: The source must stay this far from the drain's rail for the channel to
#: count as pinched off (else it conducts like a resistor), and move this
#: far when the gate is tied on. Design choice.
PINCH_MARGIN_VOLTS = 0.25


def rc_capacitance(t: float, r: float, v_inf: float, v0: float, v1: float) -> float:
    """Capacitance that charges from ``v0`` to ``v1`` in ``t`` through ``r`` towards ``v_inf``.

    ``v(t) = v_inf + (v0 - v_inf) exp(-t / (R C))`` (Horowitz & Hill, 3rd ed.,
    ch. 1), so ``C = t / (R ln((v_inf - v0) / (v_inf - v1)))``; inf when the
    voltage did not move towards ``v_inf``.
    """
    ratio = (v_inf - v0) / (v_inf - v1) if v_inf != v1 else math.inf
    if not ratio > 1.0:
        return math.inf
    return t / (r * math.log(ratio))


@dataclass(frozen=True)
class Gain:
    """One gain step: ``hfe = ic / ib`` and the voltages read (SI units)."""

    hfe: float
    ib: float
    ic: float
    vbe: float
    vce: float
    leakage: float
    saturated: bool
    resolution: float
    base: int
    collector: int
    emitter: int


@dataclass(frozen=True)
class Threshold:
    """A gate threshold (enhancement) or pinch-off voltage (JFET, depletion)."""

    volts: float
    current: float
    resolution: float
    gate: int
    drain: int
    source: int
    extra: dict = field(default_factory=dict)


def _current(bench: Bench, probe: int, rail: str, via: str, volts: float) -> float:
    """Current from ``rail`` into the board through ``probe``'s drive (A)."""
    src = bench.source(probe, rail, via)
    return (src.volts - volts) / src.resistance


def bjt_gain(bench: Bench, npn: bool, base: int, collector: int, emitter: int) -> Gain | None:
    """Gain with the base fed through the high resistor, the collector
    through the low one and the emitter at the other rail; None when the
    collector current does not follow the base drive, or the base-emitter
    junction is not forward biased by :data:`VBE_MIN_VOLTS` (the caller
    compares the gain with :data:`GAIN_MIN`).

    A leakage step first holds the base at the emitter's rail (collector
    current with no base drive); the gain step follows it directly.
    """
    p = bench.profile
    up, down = ("high", "low") if npn else ("low", "high")
    names = f"B{base + 1} C{collector + 1} E{emitter + 1}"
    off = bench.run(f"collector leakage ({names}, base held)",
                    bench.drive({base: (down, "port"), collector: (up, "low"), emitter: (down, "port")}),
                    GAIN_SETTLE_SECONDS, sampled=f"probe {collector + 1}",
                    formula="I_leak = |Vrail - Vc| / Rc")
    vc_off = bench.adc(off.result.volts[collector]).volts
    leak = abs(_current(bench, collector, up, "low", vc_off))
    rec = bench.run(f"gain ({names})",
                    bench.drive({base: (up, "high"), collector: (up, "low"), emitter: (down, "port")}),
                    GAIN_SETTLE_SECONDS, sampled=f"probes {base + 1}, {collector + 1}, {emitter + 1}",
                    formula="hFE = Ic / Ib, Ib = |Vrail - Vb| / Rhigh, Ic = |Vrail - Vc| / Rlow")
    ensure_discharged(bench)
    vb, vc, ve = (bench.adc(rec.result.volts[i]) for i in (base, collector, emitter))
    ib = abs(_current(bench, base, up, "high", vb.volts))
    ic = abs(_current(bench, collector, up, "low", vc.volts))
    # the base drive must move the collector by the detection step beyond the leakage
    moved = (vc_off - vc.volts) if npn else (vc.volts - vc_off)
    if ib <= 0 or moved < p.conduction_detect_counts * vc.lsb:
        return None
    hfe = ic / ib
    sign = 1.0 if npn else -1.0
    if sign * (vb.volts - ve.volts) < VBE_MIN_VOLTS:
        return None  # the base-emitter junction is not forward biased: no transistor action
    r_c = bench.source(collector, up, "low").resistance
    resolution = hfe * (vc.lsb / r_c / ic + vb.lsb / bench.source(base, up, "high").resistance / ib)
    vce = sign * (vc.volts - ve.volts)
    return Gain(hfe, ib, ic, sign * (vb.volts - ve.volts), vce, leak, vce < VCE_SATURATED_VOLTS,
                resolution, base, collector, emitter)


def enhancement_threshold(bench: Bench, n_channel: bool, gate: int, drain: int, source: int
                          ) -> Threshold | None:
    """Gate threshold by slow gate charging; None when no drain current starts.

    The drain is fed through the low resistor and the source tied to the
    other rail; the gate, held at the source's rail first, is then charged
    through the high resistor until the drain voltage moves by
    ``THRESHOLD_DRAIN_AMPS`` times the drain resistor. The threshold is the
    gate-source voltage read then, the gate capacitance follows from the
    time it took (:func:`rc_capacitance`).
    """
    p = bench.profile
    up, down = ("high", "low") if n_channel else ("low", "high")
    names = f"G{gate + 1} D{drain + 1} S{source + 1}"
    bias = bench.run(f"drain bias ({names}, gate held)",
                     bench.drive({gate: (down, "port"), drain: (up, "low"), source: (down, "port")}),
                     GATE_BIAS_SECONDS, sampled=f"probes {gate + 1}, {drain + 1}",
                     formula="V0 = Vg; Vd0 = Vd")
    vd0 = bench.adc(bias.result.volts[drain]).volts
    vg0 = bench.adc(bias.result.volts[gate]).volts
    r_d = bench.source(drain, up, "low").resistance
    drop = THRESHOLD_DRAIN_AMPS * r_d
    level = vd0 - drop if n_channel else vd0 + drop
    gate_src = bench.source(gate, up, "high")
    rec = bench.run(f"gate charge ({names})",
                    bench.drive({gate: (up, "high"), drain: (up, "low"), source: (down, "port")}),
                    GATE_TIMEOUT_SECONDS, watch=Watch(drain, level, rising=not n_channel),
                    sampled=f"timer until probe {drain + 1} moves {drop:.3g} V; then probes {gate + 1}, {source + 1}",
                    formula="Vth = Vg - Vs; C = t / (R ln((Vrail - V0) / (Vrail - Vg))) - offset")
    if not rec.result.crossed:
        ensure_discharged(bench)
        return None
    vg, vs_ = bench.adc(rec.result.volts[gate]), bench.adc(rec.result.volts[source])
    vd = bench.adc(rec.result.volts[drain]).volts
    if not _gate_controls_drain(bench, n_channel, gate, drain, source, drop):
        return None
    t = bench.ticks(rec.result.duration) * p.timer_tick_seconds
    farads = rc_capacitance(t, gate_src.resistance, gate_src.volts, vg0, vg.volts)
    extra = {"ticks": bench.ticks(rec.result.duration)}
    if math.isfinite(farads):
        extra["gate_capacitance"] = max(farads - p.capacitance_zero_offset_farads, 0.0)
    current = abs(vd0 - vd) / r_d
    return Threshold(vg.volts - vs_.volts, current, max(vg.lsb, vs_.lsb), gate, drain, source, extra)


def _gate_controls_drain(bench: Bench, n_channel: bool, gate: int, drain: int, source: int,
                         drop: float) -> bool:
    """Confirm that the gate, not something charging beside the part, moved
    the drain: the drain must sit at least ``CONFIRM_FACTOR * drop`` further
    towards the source with the gate tied on than with it tied off (through
    the low resistor: a junction from gate to source draws only milliamps)."""
    up, down = ("high", "low") if n_channel else ("low", "high")
    volts = []
    for state, rail in (("on", up), ("off", down)):
        rec = bench.run(f"gate {state} (confirm)",
                        bench.drive({gate: (rail, "low"), drain: (up, "low"), source: (down, "port")}),
                        GATE_BIAS_SECONDS, sampled=f"probe {drain + 1}", formula="Vd with the gate on / off")
        volts.append(bench.adc(rec.result.volts[drain]).volts)
    ensure_discharged(bench)
    moved = volts[1] - volts[0] if n_channel else volts[0] - volts[1]
    return moved >= CONFIRM_FACTOR * drop


def pinch_off(bench: Bench, n_channel: bool, gate: int, drain: int, source: int) -> Threshold | None:
    """Pinch-off (a JFET's or depletion MOSFET's threshold); None when the
    channel does not pinch off within the supply.

    The gate is tied to one rail through its port pin, the drain to the
    other through the low resistor, the source is fed through the high
    resistor from the gate's rail: the
    source settles where the channel just passes that small current, so
    ``Vgs`` there is the pinch-off voltage. A second step ties the gate to
    the drain's rail: the source must then move by at least
    ``PINCH_MARGIN_VOLTS`` towards the drain (the gate controls the
    current; a resistor does not care).
    """
    p = bench.profile
    up, down = ("high", "low") if n_channel else ("low", "high")
    names = f"G{gate + 1} D{drain + 1} S{source + 1}"
    rec = bench.run(f"pinch-off ({names})",
                    bench.drive({gate: (down, "port"), drain: (up, "low"), source: (down, "high")}),
                    PINCH_SETTLE_SECONDS, sampled=f"probes {gate + 1}, {drain + 1}, {source + 1}",
                    formula="Vp = Vg - Vs; Id = |Vs - Vrail| / Rhigh")
    vg, vd, vs_ = (bench.adc(rec.result.volts[i]) for i in (gate, drain, source))
    current = abs(_current(bench, source, down, "high", vs_.volts))
    if (abs(vd.volts - vs_.volts) < PINCH_MARGIN_VOLTS
            or current * bench.source(source, down, "high").resistance < PINCH_MARGIN_VOLTS):
        ensure_discharged(bench)
        return None  # conducts like a resistor, or no channel at all
    # the gate must control it: tied to the drain's rail the channel opens
    on = bench.run(f"gate on (confirm, {names})",
                   bench.drive({gate: (up, "low"), drain: (up, "low"), source: (down, "high")}),
                   PINCH_SETTLE_SECONDS, sampled=f"probe {source + 1}", formula="Vs with the gate on")
    ensure_discharged(bench)
    vs_on = bench.adc(on.result.volts[source]).volts
    if (vs_on - vs_.volts if n_channel else vs_.volts - vs_on) < PINCH_MARGIN_VOLTS:
        return None
    return Threshold(vg.volts - vs_.volts, current, max(vg.lsb, vs_.lsb), gate, drain, source)
