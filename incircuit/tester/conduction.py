"""Discharge and conduction tests: the first steps of every identification.

``discharge`` ties every probe to 0 V (through the low resistors while a
probe reads above ``discharge.direct_volts``, then through the bare port
pins) until every probe reads below ``discharge.target_volts``.

``conduction`` drives one probe high and the other low, first through the
low resistor (about 7 mA) and then through the high one (about 10 uA), and
samples the part's voltage half-way and at the end of each pulse. When the
voltage rises, or the current falls, during a pulse (the part is charging)
the driven probe is left floating for a moment (the hold): a voltage that
stays is stored charge. Each direction
is then one of:

``capacitive``  charging and holding (stored charge);
``linear``      conducts like a resistor: the low-resistor sample matches
                the resistor that explains the high-resistor sample;
``junction``    conducts far more at the higher current than a resistor
                would (a forward or broken-down junction);
``open``        no current at either level.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..engines.base import Watch
from .bench import Bench

__all__ = ["Pulse", "Direction", "Undischargeable", "discharge", "ensure_discharged", "conduction", "pulse"]


@dataclass(frozen=True)
class Pulse:
    """One conduction pulse as the tester read it (volts over the part, amps)."""

    level: str
    v_mid: float
    v_end: float
    current: float
    conducting: bool
    rising: bool
    holding: bool
    lsb: float
    #: Probe voltages at the end, as read: (driven probe, other probe).
    probes: tuple[float, float]


@dataclass(frozen=True)
class Direction:
    """Both pulses of one polarity: ``high`` probe driven to the supply."""

    high: int
    low: int
    at_low: Pulse
    #: None when the low-resistor pulse already showed stored charge.
    at_high: Pulse | None
    kind: str

    def apparent_ohms(self, pulse: Pulse | None) -> float:
        if pulse is None or pulse.current <= 0:
            return float("inf")
        return pulse.v_end / pulse.current


#: Watches per discharge stage. A part that rings (an inductor against the
#: probes' stray capacitance) swings the highest probe from one to the other
#: several times before it settles, so each swing needs a watch of its own;
#: the stage's time budget still bounds the whole discharge.
MAX_DISCHARGE_WATCHES = 64


class Undischargeable(Exception):
    """The part kept its charge past the discharge timeout."""


def discharge(bench: Bench, name: str = "discharge") -> bool:
    """Discharge the part; False when it cannot be done within the timeout.

    Each stage ties every probe to 0 V and watches the probe that reads
    highest until it falls below the stage's level (a watch already past
    its level ends the step at once), then reads every probe again.
    """
    p = bench.profile
    budget = p.discharge_timeout_seconds
    probes = range(bench.n_probes)
    last = bench.records[-1].result.volts if bench.records else (0.0,) * bench.n_probes
    volts = [bench.adc(v).volts for v in last]
    for via, level in (("low", p.discharge_direct_volts), ("port", p.discharge_target_volts)):
        drive = bench.drive({i: ("low", via) for i in probes})
        for _ in range(MAX_DISCHARGE_WATCHES):
            top = max(probes, key=lambda i: volts[i])
            rec = bench.run(f"{name} ({via})", drive, max(budget, 0.0), watch=Watch(top, level, rising=False),
                            sampled=f"probe {top + 1} until below {level:g} V, then every probe",
                            formula=f"all probes below {level:g} V")
            budget -= rec.result.duration
            volts = [bench.adc(v).volts for v in rec.result.volts]
            if max(volts) < p.discharge_target_volts:
                return True
            if max(volts) < level:
                break
            if budget <= 0 or not rec.result.crossed:
                return False
        else:
            return False
    return True


def ensure_discharged(bench: Bench, name: str = "discharge") -> None:
    """:func:`discharge`, raising :class:`Undischargeable` when it fails."""
    if not discharge(bench, name):
        raise Undischargeable(name)


def pulse(bench: Bench, high: int, low: int, level: str) -> Pulse:
    """Drive ``high`` through the ``level`` resistor, ``low`` through its port."""
    p = bench.profile
    length = p.conduction_low_seconds if level == "low" else p.conduction_high_seconds
    drive = bench.drive({high: ("high", level), low: ("low", "port")})
    r_drive = drive[high].resistance  # type: ignore[union-attr]
    rec = bench.run(f"conduction {high + 1}->{low + 1} ({level} resistor)", drive, length,
                    at=(length / 2,), sampled=f"probes {high + 1} and {low + 1}, half-way and at the end",
                    formula="I = (Vs - Va) / Rk; V = Va - Vb")
    mid = rec.at(length / 2)
    a_mid, b_mid = bench.adc(mid[high]), bench.adc(mid[low])
    a_end, b_end = bench.adc(rec.result.volts[high]), bench.adc(rec.result.volts[low])
    v_mid = a_mid.volts - b_mid.volts
    v_end = a_end.volts - b_end.volts
    lsb = max(a_end.lsb, b_end.lsb)
    conducting = bench.full_count() - a_end.count >= p.conduction_detect_counts
    current = (p.supply_volts - a_end.volts) / r_drive if conducting else 0.0
    # charging: the part's voltage rises, or the current through the known resistor falls
    enough = p.conduction_rise_counts * lsb
    rise = v_end - v_mid
    fall = a_end.volts - a_mid.volts  # = (i_mid - i_end) * Rk
    drop_mid = p.supply_volts - a_mid.volts  # = i_mid * Rk
    rising = (rise >= enough and rise >= p.conduction_rise_fraction * abs(v_end)) or (
        fall >= p.conduction_rise_counts * a_end.lsb and fall >= p.conduction_rise_fraction * drop_mid)
    holding = False
    if rising:
        hold = bench.run(f"hold {high + 1} ({level} resistor)",
                         bench.drive({low: ("low", "port")}), p.conduction_hold_seconds,
                         sampled=f"probe {high + 1} floating",
                         formula="|V - kept| <= (1 - hold_fraction) |V| + 2 counts")
        kept = bench.adc(hold.result.volts[high]).volts - bench.adc(hold.result.volts[low]).volts
        holding = abs(v_end - kept) <= (1.0 - p.conduction_hold_fraction) * abs(v_end) + 2 * lsb
    return Pulse(level, v_mid, v_end, max(current, 0.0), conducting, rising, holding, lsb,
                 (a_end.volts, b_end.volts))


def _kind(bench: Bench, high: int, at_low: Pulse, at_high: Pulse) -> str:
    p = bench.profile
    if at_low.rising and at_low.holding:
        return "capacitive"
    if at_low.conducting:
        if at_high.rising and at_high.holding:
            return "junction"  # charge seen only at the small current: a junction beside a capacitor
        if not at_high.conducting:
            return "junction"
        return "linear" if _linear(bench, high, at_low, at_high) else "junction"
    if at_high.rising and at_high.holding:
        return "capacitive"
    if at_high.conducting:
        return "linear" if _linear(bench, high, at_low, at_high) else "junction"
    return "open"


def _linear(bench: Bench, high: int, at_low: Pulse, at_high: Pulse) -> bool:
    """Does the low-resistor pulse read what a resistor seen at the high level would give?"""
    p = bench.profile
    r_seen = at_high.v_end / at_high.current
    r_loop = p.port_high_ohms + p.probe_ohms(high, "low") + p.port_low_ohms
    expected = p.supply_volts * r_seen / (r_seen + r_loop)
    return at_low.v_end >= expected * (1.0 - p.conduction_linear_tolerance) - 2 * at_low.lsb


def conduction(bench: Bench, high: int, low: int) -> Direction:
    """Both conduction pulses of one polarity (raises Undischargeable).

    When the low-resistor pulse already shows stored charge the polarity is
    capacitive and the high-resistor pulse is skipped (``at_high`` None).
    """
    at_low = pulse(bench, high, low, "low")
    ensure_discharged(bench)
    if at_low.rising and at_low.holding:
        return Direction(high, low, at_low, None, "capacitive")
    at_high = pulse(bench, high, low, "high")
    ensure_discharged(bench)
    return Direction(high, low, at_low, at_high, _kind(bench, high, at_low, at_high))
