"""The measurement methods the identification calls once it knows the kind.

Each returns a :class:`Measured`: the value, its resolution (change of the
value for one ADC count or timer tick) and the method's name, which keys
the stated accuracy in the profile. Formulas: :mod:`.formulas`.

Resistance (``divider``), chosen by the estimate ``R`` from the conduction
pulses, in each polarity:

=================  ==========================================  ==============
estimate           driven probe / other probe                  current from
=================  ==========================================  ==============
R < Rlow           supply via low resistor / 0 V via port      driven side
R < sqrt(Rlo Rhi)  supply via port / 0 V via low resistor      other side
R < Rhigh          supply via high resistor / 0 V via port     driven side
else               supply via port / 0 V via high resistor     other side
=================  ==========================================  ==============

so that the voltage the current is read from is a small one, read against
the band-gap reference where possible.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ..engines.base import Watch
from . import formulas as fm
from .bench import Bench
from .conduction import ensure_discharged

__all__ = [
    "Measured",
    "resistance",
    "capacitance",
    "inductance",
    "junction_capacitance",
]


@dataclass(frozen=True)
class Measured:
    value: float
    resolution: float
    method: str
    extra: dict = field(default_factory=dict)


# -- resistance -----------------------------------------------------------------

def _divider_config(bench: Bench, high: int, low: int, estimate: float) -> tuple[str, str]:
    p = bench.profile
    r_lo, r_hi = p.probe_ohms(high, "low"), p.probe_ohms(high, "high")
    if estimate < r_lo:
        return ("drive", "low")
    if estimate < math.sqrt(p.probe_ohms(low, "low") * p.probe_ohms(low, "high")):
        return ("sense", "low")
    if estimate < r_hi:
        return ("drive", "high")
    return ("sense", "high")


def resistance_once(bench: Bench, high: int, low: int, estimate: float) -> Measured:
    """One divider measurement with ``high`` driven to the supply."""
    p = bench.profile
    side, via = _divider_config(bench, high, low, estimate)
    if side == "drive":
        drive = bench.drive({high: ("high", via), low: ("low", "port")})
        rk = drive[high].resistance  # type: ignore[union-attr]
        vs = p.supply_volts

        def ohms(va: float, vb: float) -> float:
            return fm.divider_resistance(va, vb, (vs - va) / rk)
        text = "R = (Va - Vb) / ((Vs - Va) / Rk)"
    else:
        drive = bench.drive({high: ("high", "port"), low: ("low", via)})
        rk = drive[low].resistance  # type: ignore[union-attr]

        def ohms(va: float, vb: float) -> float:
            return fm.divider_resistance(va, vb, vb / rk)
        text = "R = (Va - Vb) / (Vb / Rk)"
    settle = p.resistance_settle_low_seconds if via == "low" else p.resistance_settle_high_seconds
    ensure_discharged(bench)
    rec = bench.run(f"resistance {high + 1}->{low + 1} ({via} resistor, {side} side)", drive, settle,
                    sampled=f"probes {high + 1} and {low + 1} after the settling wait", formula=text)
    a, b = bench.adc(rec.result.volts[high]), bench.adc(rec.result.volts[low])
    value = ohms(a.volts, b.volts)
    res = fm.resolution(ohms, [a.volts, b.volts], {0: a.lsb, 1: b.lsb})
    return Measured(value, res, "divider", {"config": f"{via}-{side}"})


def resistance(bench: Bench, estimates: tuple[float, float]) -> Measured:
    """Resistance between probes 1 and 2: the mean of both polarities."""
    one = resistance_once(bench, 0, 1, estimates[0])
    two = resistance_once(bench, 1, 0, estimates[1])
    if not (math.isfinite(one.value) and math.isfinite(two.value)):
        return Measured(math.inf, math.inf, "divider")
    value = 0.5 * (one.value + two.value)
    extra = {"forward_ohms": one.value, "reverse_ohms": two.value}
    return Measured(value, 0.5 * (one.resolution + two.resolution), "divider", extra)


# -- capacitance ----------------------------------------------------------------

def _charge_drive(bench: Bench, high: int, low: int, via: str):
    drive = bench.drive({high: ("high", via), low: ("low", "port")})
    r_drive = drive[high].resistance  # type: ignore[union-attr]
    return drive, r_drive, r_drive + drive[low].resistance  # type: ignore[union-attr]


def _float_read(bench: Bench, high: int, low: int, name: str, extra: float = 0.0) -> tuple:
    """Let ``high`` float and read the part's voltage (after ``read_seconds``).

    With ``extra`` the probe floats that much longer and a second reading
    follows. Returns ``((volts, lsb), ...)``.
    """
    p = bench.profile
    wait = p.capacitance_read_seconds
    rec = bench.run(name, bench.drive({low: ("low", "port")}), wait + extra, at=(wait,),
                    sampled=f"probe {high + 1} floating", formula="V = Va - Vb")
    first = rec.at(wait)
    a, b = bench.adc(first[high]), bench.adc(first[low])
    out = [(a.volts - b.volts, max(a.lsb, b.lsb))]
    if extra:
        a2, b2 = bench.adc(rec.result.volts[high]), bench.adc(rec.result.volts[low])
        out.append((a2.volts - b2.volts, max(a2.lsb, b2.lsb)))
    return tuple(out)


def _residual(bench: Bench, high: int, low: int) -> tuple[float, float]:
    """The voltage left on the part (signed), read from either side."""
    ((v, lsb),) = _float_read(bench, high, low, "read residual voltage")
    if v > 0.0:
        return v, lsb
    ((w, lsb),) = _float_read(bench, low, high, "read residual voltage (other side)")
    return -w, lsb


def _size(bench: Bench, high: int, low: int) -> float:
    """Rough capacitance from a short pulse through the low resistor."""
    p = bench.profile
    drive, _, r_total = _charge_drive(bench, high, low, "low")
    rec = bench.run("size pulse", drive, p.capacitance_size_seconds,
                    sampled=f"probes {high + 1} and {low + 1} at the end",
                    formula="C ~ T / (R ln(Vs / (Vs - V)))")
    a, b = bench.adc(rec.result.volts[high]), bench.adc(rec.result.volts[low])
    if bench.full_count() - a.count < p.conduction_detect_counts:
        return 0.0
    v = a.volts - b.volts
    if v <= 0.0:
        return math.inf
    return fm.fixed_time_capacitance(p.capacitance_size_seconds, r_total, p.supply_volts, v)


def _threshold(bench: Bench, high: int, low: int, via: str, timeout: float,
               name: str = "capacitance") -> Measured | None:
    """Time to the comparator threshold through the ``via`` resistor; None on timeout.

    The voltage left on the part is read first and enters the formula.
    """
    p = bench.profile
    drive, r_drive, r_total = _charge_drive(bench, high, low, via)
    vs, vth, tick = p.supply_volts, p.comparator_reference_volts, p.timer_tick_seconds
    v0, _ = _residual(bench, high, low)
    rec = bench.run(f"{name} ({via} resistor, time to threshold)", drive, timeout,
                    watch=Watch(high, vth, rising=True), sampled="timer until the comparator trips",
                    formula="C = t / (R ln(Rd (Vs - V0) / (R (Vs - Vth)))) - offset")
    if not rec.result.crossed:
        return None
    n = bench.ticks(rec.result.duration)

    def farads(t: float) -> float:
        return fm.threshold_capacitance(t, r_drive, r_total, vs, vth, v0) - p.capacitance_zero_offset_farads
    value = farads(n * tick)
    if not math.isfinite(value):
        return None  # the part already sat above the threshold
    return Measured(value, abs(farads((n + 1) * tick) - value), f"threshold_{via}", {"ticks": n})


def _fixed(bench: Bench, high: int, low: int, estimate: float) -> Measured | None:
    """Fixed-time charge through the low resistor; None when nothing moved."""
    p = bench.profile
    drive, _, r_total = _charge_drive(bench, high, low, "low")
    vs, target = p.supply_volts, p.capacitance_fixed_target_volts
    v0, lsb0 = _residual(bench, high, low)
    total = 0.0
    v, lsb = v0, lsb0
    for _ in range(3):
        if math.isfinite(estimate) and estimate > 0:
            want = estimate * r_total * math.log((vs - v0) / (vs - target)) - total
        else:
            want = p.capacitance_fixed_first_seconds
        want = min(max(want, p.capacitance_size_seconds), p.capacitance_fixed_max_seconds - total)
        if want <= 0:
            break
        bench.run("capacitance (low resistor, fixed-time charge)", drive, want,
                  sampled="nothing (fixed time)", formula="C = T / (R ln((Vs - V0) / (Vs - V))) - offset")
        total += want
        ((v, lsb),) = _float_read(bench, high, low, "read after charging")
        if v - v0 >= 0.5 * target or total >= p.capacitance_fixed_max_seconds:
            break
        estimate = fm.fixed_time_capacitance(total, r_total, vs, v, v0)
    if v <= v0:
        return None

    def farads(v_end: float, v_start: float) -> float:
        return fm.fixed_time_capacitance(total, r_total, vs, v_end, v_start) - p.capacitance_zero_offset_farads
    value = farads(v, v0)
    res = fm.resolution(farads, [v, v0], {0: lsb, 1: lsb0})
    return Measured(value, res, "fixed_time", {"charge_seconds": total})


def capacitance(bench: Bench, high: int = 0, low: int = 1) -> Measured | None:
    """Capacitance with ESR and self-discharge; None when beyond every method.

    The size pulse chooses the method; a threshold method that times out
    falls through to the next larger one.
    """
    p = bench.profile
    ensure_discharged(bench)
    estimate = _size(bench, high, low)
    ensure_discharged(bench)
    esr_raw = None
    if estimate >= p.capacitance_esr_min_farads:
        esr_raw = _esr_step(bench, high, low)
        ensure_discharged(bench)
    found = None
    if estimate < p.capacitance_high_max_farads:
        found = _threshold(bench, high, low, "high", p.capacitance_high_timeout_seconds)
        if found is None:
            ensure_discharged(bench)
    if found is None and estimate < p.capacitance_low_max_farads:
        found = _threshold(bench, high, low, "low", p.capacitance_low_timeout_seconds)
        if found is None:
            ensure_discharged(bench)
    if found is None:
        found = _fixed(bench, high, low, estimate)
    if found is None or found.value < p.capacitance_min_farads:
        ensure_discharged(bench)
        return found
    extra = dict(found.extra)
    (v1, _), (v2, _) = _float_read(bench, high, low, "self-discharge", p.capacitance_self_discharge_seconds)
    drop = fm.relative_drop(v1, v2)
    if math.isfinite(drop):
        extra["self_discharge"] = max(drop, 0.0)
    if esr_raw is not None and found.value >= p.capacitance_esr_min_farads:
        v0, v_step, current, lsb = esr_raw
        esr = fm.series_esr(v0, v_step, current, p.capacitance_esr_sample_seconds, found.value)
        if math.isfinite(esr):
            extra["esr"] = max(esr, 0.0)
            extra["esr_resolution"] = 2 * lsb / current
    ensure_discharged(bench)
    return Measured(found.value, found.resolution, found.method, extra)


def _esr_step(bench: Bench, high: int, low: int) -> tuple[float, float, float, float] | None:
    """Read the part, start the low-resistor current, read again shortly after."""
    p = bench.profile
    v0, _ = _residual(bench, high, low)
    drive, r_drive, _ = _charge_drive(bench, high, low, "low")
    rec = bench.run("ESR step", drive, p.capacitance_esr_sample_seconds,
                    sampled=f"probes {high + 1} and {low + 1} at the end",
                    formula="ESR = (V - V0 - I t / C) / I")
    a, b = bench.adc(rec.result.volts[high]), bench.adc(rec.result.volts[low])
    current = (p.supply_volts - a.volts) / r_drive
    if current <= 0:
        return None
    return (v0, a.volts - b.volts, current, max(a.lsb, b.lsb))


# -- inductance -----------------------------------------------------------------

def inductance(bench: Bench, r_dc: float, high: int = 0, low: int = 1) -> Measured | None:
    """Inductance from the current rise time; None when the part is a resistor.

    The current is sensed over the other probe's port pin (or, for a larger
    DC resistance, its low resistor); the sense voltage must end at least
    ``margin`` times above the comparator threshold.
    """
    p = bench.profile
    vs, vth, tick = p.supply_volts, p.comparator_reference_volts, p.timer_tick_seconds
    for via in ("port", "low"):
        drive = bench.drive({high: ("high", "port"), low: ("low", via)})
        r_sense = drive[low].resistance  # type: ignore[union-attr]
        r_total = drive[high].resistance + r_dc + r_sense  # type: ignore[union-attr]
        if vs * r_sense / r_total >= p.inductance_margin * vth:
            break
    else:
        return None
    ensure_discharged(bench)
    rec = bench.run(f"inductance ({via} sense, current rise)", drive, p.inductance_timeout_seconds,
                    watch=Watch(low, vth, rising=True), sampled="timer until the comparator trips",
                    formula="L = t R / ln(V_inf / (V_inf - Vth))")
    ensure_discharged(bench)
    if not rec.result.crossed:
        return None
    n = bench.ticks(rec.result.duration)
    if n < p.inductance_min_ticks:
        return None

    def henries(t: float) -> float:
        return fm.rise_inductance(t, r_total, r_sense, vs, vth)
    value = henries(n * tick)
    return Measured(value, abs(henries((n + 1) * tick) - value), "current_rise", {"ticks": n})


# -- junctions ------------------------------------------------------------------

def junction_capacitance(bench: Bench, anode: int, cathode: int) -> float | None:
    """Reverse-biased junction capacitance by the small-capacitor method."""
    p = bench.profile
    ensure_discharged(bench)
    found = _threshold(bench, cathode, anode, "high", p.junction_capacitance_timeout_seconds,
                       name="junction capacitance")
    ensure_discharged(bench)
    if found is None:
        return None
    return max(found.value, 0.0)
