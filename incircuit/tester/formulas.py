"""Closed forms the tester computes its values with (SI units throughout).

All follow from Ohm's law and the RC/RL step response (Horowitz & Hill,
*The Art of Electronics*, 3rd ed., ch. 1). The circuits are the tester's:
the driven probe reaches the supply ``vs`` through ``r_drive`` (port pin
plus series resistor), the other probe reaches 0 V through ``r_total -
r_drive``.

>>> round(threshold_capacitance(11.65e-6, 470e3, 470e3, 5.0, 1.1) * 1e12, 1)
99.8
>>> round(divider_resistance(2.5, 0.0, 2.5 / 1e3), 6)
1000.0
"""

from __future__ import annotations

import math

__all__ = [
    "divider_resistance",
    "threshold_capacitance",
    "fixed_time_capacitance",
    "rise_inductance",
    "series_esr",
    "relative_drop",
    "resolution",
]


def divider_resistance(v_high: float, v_low: float, current: float) -> float:
    """Resistance between two probes at ``v_high`` and ``v_low`` carrying ``current``.

    ``R = (Va - Vb) / I`` with ``I`` taken from the drop over a known resistor
    (``I = (Vs - Va) / Rk`` on the driven side or ``I = Vb / Rk`` on the
    other); inf when no current flows.
    """
    if current <= 0.0:
        return math.inf
    return max(v_high - v_low, 0.0) / current


def threshold_capacitance(t: float, r_drive: float, r_total: float, vs: float, vth: float,
                          v0: float = 0.0) -> float:
    """Capacitance from the time ``t`` the driven probe takes to reach ``vth``.

    The part starts at ``v0`` and charges through ``r_total``; the probe sits
    at ``Vs - (r_drive / r_total) * (Vs - v0) * exp(-t / (r_total C))``, so

    ``C = t / (r_total * ln(r_drive (Vs - v0) / (r_total (Vs - vth))))``,

    which is ``t / (R ln(Vs / (Vs - Vth)))`` when the far probe is ideal.
    """
    ratio = r_drive * (vs - v0) / (r_total * (vs - vth))
    if ratio <= 1.0:
        return math.inf
    return t / (r_total * math.log(ratio))


def fixed_time_capacitance(t: float, r_total: float, vs: float, v: float, v0: float = 0.0) -> float:
    """Capacitance charged from ``v0`` to ``v`` in a fixed time ``t`` through ``r_total``.

    ``C = t / (R ln((Vs - v0) / (Vs - v)))``; inf when the voltage did not
    move, 0 when it reached the supply (no resolution left).
    """
    if v <= v0:
        return math.inf
    if v >= vs:
        return 0.0
    return t / (r_total * math.log((vs - v0) / (vs - v)))


def rise_inductance(t: float, r_total: float, r_sense: float, vs: float, vth: float) -> float:
    """Inductance from the time ``t`` the current takes to reach a threshold.

    ``i(t) = I_inf (1 - exp(-t R / L))`` with ``I_inf = Vs / R`` (``R`` =
    ``r_total``, the whole loop); the current is sensed as the voltage over
    ``r_sense`` and the comparator trips at ``vth``:

    ``L = t R / ln(V_inf / (V_inf - vth))`` with ``V_inf = I_inf r_sense``.
    """
    v_inf = vs * r_sense / r_total
    if v_inf <= vth:
        return math.inf
    return t * r_total / math.log(v_inf / (v_inf - vth))


def series_esr(v_before: float, v_step: float, current: float, t: float, capacitance: float) -> float:
    """Series resistance from the voltage step when ``current`` starts.

    The voltage over the part ``t`` after the current starts is
    ``v_before + I ESR + I t / C``; the charge term is taken off with the
    measured capacitance.
    """
    if current <= 0.0:
        return math.nan
    charge = current * t / capacitance if capacitance > 0 and math.isfinite(capacitance) else 0.0
    return (v_step - v_before - charge) / current


def relative_drop(v_before: float, v_after: float) -> float:
    """Fraction of a held voltage lost, ``(v_before - v_after) / v_before``."""
    if v_before <= 0.0:
        return math.nan
    return (v_before - v_after) / v_before


def resolution(formula, args: list[float], steps: dict[int, float]) -> float:
    """Change of ``formula(*args)`` when each quantised input moves one step.

    ``steps`` maps an argument index to its step (one ADC count in volts or
    one timer tick in seconds); the changes add. Non-finite changes give inf.
    """
    base = formula(*args)
    total = 0.0
    for index, step in steps.items():
        moved = list(args)
        moved[index] += step
        change = abs(formula(*moved) - base)
        if not math.isfinite(change):
            return math.inf
        total += change
    return total
