"""Healthy bands for fault detection, and the tolerance of a part's reading.

A fault is detectable when its reading leaves the band of healthy readings.
The judge takes the band as an input: anything with ``contains(reading)``
(and ideally ``describe()`` and ``to_dict()``) will do, such as a Monte
Carlo band over every part's tolerance. Without one it builds a
:class:`ToleranceBand`: the in-circuit readings with the part at the two
ends of its tolerance (for a semiconductor: with the sensitivity's model
parameter scaled both ways), each widened by the instrument's accuracy and
by :data:`~.thresholds.DETECT_MARGIN`. A capacitor reading that carries an
ESR or a self-discharge also has a healthy range of each, widened by
``ESR_COUNTS`` steps of the tester's ESR resolution and by
``SELF_DISCHARGE_MARGIN``, so a high-ESR or leakage fault shows even when
the capacitance stays put.

>>> from incircuit.model import Reading
>>> band = ToleranceBand.of([Reading("resistor", 950.0), Reading("resistor", 1050.0)],
...                         accuracy=lambda r: 10.0, margin=0.0)
>>> band.contains(Reading("resistor", 1055.0)), band.contains(Reading("resistor", 1070.0))
(True, False)
>>> band.describe()
'resistor 940 ohm .. 1.06 kohm'
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Iterable, Mapping, Protocol

from ..model import Part, Reading
from ..units import format_value
from .thresholds import (
    DEFAULT_TOLERANCE, DETECT_MARGIN, ESR_COUNTS, READING_TOLERANCE, SELF_DISCHARGE_MARGIN,
)

__all__ = ["HealthyBand", "ToleranceBand", "part_tolerance"]


class HealthyBand(Protocol):
    """What the judge needs of a healthy band."""

    def contains(self, reading: Reading) -> bool: ...


def part_tolerance(part: Part) -> tuple[float, float, str]:
    """``(minus, plus, origin)`` of the part's relative tolerance: from the
    netlist, else the default for its kind (``thresholds.DEFAULT_TOLERANCE``
    for R/C/L, ``READING_TOLERANCE`` of the reading for semiconductors)."""
    if part.tolerance is not None and part.kind in DEFAULT_TOLERANCE:
        return part.tolerance.minus, part.tolerance.plus, part.tolerance.origin
    if part.kind in DEFAULT_TOLERANCE:
        t = DEFAULT_TOLERANCE[part.kind]
        return t, t, "default"
    t = READING_TOLERANCE.get(part.kind, READING_TOLERANCE["X"])
    return t, t, "reading"


def _widen_extras(extras: dict[str, tuple[float, float]], r: Reading) -> None:
    """Grow the healthy ranges of a capacitor reading's ESR and self-discharge."""
    resolution = float(r.extra.get("esr_resolution", 0.0) or 0.0)  # type: ignore[arg-type]
    for key, step in (("esr", ESR_COUNTS * resolution), ("self_discharge", SELF_DISCHARGE_MARGIN)):
        if r.extra.get(key) is None:
            continue
        value = float(r.extra[key])  # type: ignore[arg-type]
        old = extras.get(key, (value - step, value + step))
        extras[key] = (min(old[0], value - step), max(old[1], value + step))


#: Reading kinds whose value cannot be negative.
NON_NEGATIVE_KINDS = frozenset({"resistor", "capacitor", "inductor", "diode", "diode-pair"})


@dataclass(frozen=True)
class ToleranceBand:
    """Per reading kind, the lowest and highest healthy value (None: a
    kind without a value, such as "nothing")."""

    ranges: Mapping[str, tuple[float, float] | None]
    margin: float = DETECT_MARGIN
    source: str = "tolerance"
    units: Mapping[str, str | None] | None = None
    #: Healthy ranges of a capacitor reading's extras: "esr" (ohm) and
    #: "self_discharge" (fraction), when the readings carry them.
    extras: Mapping[str, tuple[float, float]] | None = None

    @classmethod
    def of(cls, readings: Iterable[Reading], accuracy: Callable[[Reading], float],
           margin: float = DETECT_MARGIN) -> "ToleranceBand":
        ranges: dict[str, tuple[float, float] | None] = {}
        units: dict[str, str | None] = {}
        extras: dict[str, tuple[float, float]] = {}
        for r in readings:
            units.setdefault(r.kind, r.unit)
            if r.kind == "capacitor":
                _widen_extras(extras, r)
            if r.value is None:
                ranges.setdefault(r.kind, None)
                continue
            acc = abs(float(accuracy(r)))
            lo, hi = r.value - acc, r.value + acc
            if r.kind in NON_NEGATIVE_KINDS and r.value >= 0:
                lo = max(lo, 0.0)  # an ohm, farad, henry or forward drop is never below zero
            old = ranges.get(r.kind)
            if old is not None:
                lo, hi = min(lo, old[0]), max(hi, old[1])
            ranges[r.kind] = (lo, hi)
        return cls(ranges, margin, units=units, extras=extras)

    def contains(self, reading: Reading) -> bool:
        if reading.kind not in self.ranges:
            return False
        rng = self.ranges[reading.kind]
        if rng is None or reading.value is None:
            return rng is None and reading.value is None
        lo, hi = rng
        if not lo - self.margin * abs(lo) <= reading.value <= hi + self.margin * abs(hi):
            return False
        if reading.kind == "capacitor":
            for key, (elo, ehi) in (self.extras or {}).items():
                got = reading.extra.get(key)
                if got is not None and not elo <= float(got) <= ehi:  # type: ignore[arg-type]
                    return False
        return True

    def describe(self) -> str:
        parts = []
        for kind, rng in self.ranges.items():
            if rng is None:
                parts.append(kind)
            else:
                unit = (self.units or {}).get(kind)
                parts.append(f"{kind} {format_value(rng[0], unit)} .. {format_value(rng[1], unit)}")
        text = " or ".join(parts)
        extras = self.extras or {}
        if "esr" in extras:
            lo, hi = extras["esr"]
            text += f", ESR {format_value(max(lo, 0.0), 'ohm')} .. {format_value(hi, 'ohm')}"
        if "self_discharge" in extras:
            text += f", self-discharge up to {extras['self_discharge'][1] * 100:.0f} %"
        return text

    def to_dict(self) -> dict:
        return {"source": self.source, "margin": self.margin,
                "ranges": {k: (list(v) if v is not None else None) for k, v in self.ranges.items()},
                "extras": {k: list(v) for k, v in (self.extras or {}).items()}}
