"""What a bench multimeter or LCR meter reads between two nets of a board.

Each function models the instrument on the whole board (the rest of the
board floats, exactly as with the three-probe tester):

:func:`ohms`
    Constant test current per range, autoranging from the lowest range;
    a range is over when the voltage would pass its full scale or the
    meter's open-circuit voltage. DC solve of the board: capacitors open,
    inductors shorts, junctions as Shockley diodes (they stay off at
    these voltages, which is the point of a low-power range).
:func:`diode_drop`
    The diode test: a constant current with a few volts of compliance;
    the reading is the voltage across the probes.
:func:`impedance`
    The LCR meter: small-signal AC analysis of the whole board at one
    frequency, junctions as their zero-bias model; the peak signal each
    junction sees is reported so the caller can tell whether that model
    holds at the meter's test level.

``guard`` names a net held at the low probe's potential; the current
through it is not measured (a three-wire guarded measurement).

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 4.7e3),))
>>> r = ohms(b, "A", "B", bench_profiles()[1])
>>> (r.quantity, round(r.value), r.setting)
('R', 4700, '20 kohm range')
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Mapping

from ..errors import EngineError
from ..model import Board
from ..units import format_value
from .impedance import Equivalents
from .network import Network
from .profile import BenchProfile, bench_profiles

__all__ = ["BenchReading", "ohms", "diode_drop", "impedance", "lcr_reading", "LCR_QUANTITIES",
           "bench_profiles"]

#: LCR quantity -> unit.
LCR_QUANTITIES = {"rs": "ohm", "rp": "ohm", "cs": "F", "cp": "F", "ls": "H", "lp": "H"}
_LABEL = {"rs": "Rs", "rp": "Rp", "cs": "Cs", "cp": "Cp", "ls": "Ls", "lp": "Lp"}


@dataclass(frozen=True)
class BenchReading:
    """One bench reading. ``value`` None means over range (nothing found)."""

    instrument: str
    quantity: str
    value: float | None
    unit: str
    accuracy: float
    setting: str
    guard: str | None = None
    frequency: float | None = None
    equivalents: Equivalents | None = None
    #: Junction name -> its forward current (A) during a DC reading, or the
    #: peak forward voltage (V) of the test signal across it for an LCR reading.
    junctions: Mapping[str, float] = field(default_factory=dict)
    #: The test current of a DC reading (A).
    current: float | None = None

    def describe(self) -> str:
        label = _LABEL.get(self.quantity, self.quantity)
        shown = format_value(self.value, self.unit) if self.value is not None else "over range"
        where = f" with {self.guard} guarded" if self.guard else ""
        return f"{label} = {shown} ({self.setting}{where})"

    def to_dict(self) -> dict:
        return {
            "instrument": self.instrument, "quantity": self.quantity, "value": self.value,
            "unit": self.unit, "accuracy": self.accuracy if math.isfinite(self.accuracy) else None,
            "setting": self.setting, "guard": self.guard, "frequency": self.frequency,
            "junctions": dict(self.junctions), "current": self.current,
        }


def _check_nets(board: Board, *nets: str | None) -> None:
    known = set(board.nets)
    for net in nets:
        if net is not None and net not in known:
            raise EngineError(f"net {net} is not on board {board.name}")


def _dc(board: Board, a: str, b: str, guard: str | None, *, current: float, open_volts: float
        ) -> tuple[float | None, float, dict[str, float]]:
    """Constant ``current`` into ``a`` limited to ``open_volts``: (volts or
    None when the source runs out of compliance, measured current, junction currents)."""
    net = Network(board, 0.0, small_signal=False)
    fixed = {b: 0.0} if guard is None else {b: 0.0, guard: 0.0}
    if net.index[a] == net.index[b]:
        return 0.0, current, {}
    _, into = net.solve_dc({a: open_volts, **fixed})
    if into[a] < current:  # the network cannot take the test current below the compliance
        return None, 0.0, {}
    v, into = net.solve_dc(fixed, {a: current})
    flows = {j.name: j.current(float(v[net.index[j.anode]] - v[net.index[j.cathode]]))
             for j in net.junctions}
    return float(v[net.index[a]]), -float(into[b]), flows


def ohms(board: Board, a: str, b: str, profile: BenchProfile, guard: str | None = None) -> BenchReading:
    """The multimeter's resistance reading from ``a`` (+) to ``b`` (-)."""
    _check_nets(board, a, b, guard)
    for rng in profile.ranges:
        volts, measured, flows = _dc(board, a, b, guard, current=rng.current, open_volts=profile.open_volts)
        if volts is None or measured <= 0 or volts > rng.full_scale * measured:
            continue  # over this range (with a guard, part of the current is not measured)
        value = volts / measured
        return BenchReading(profile.id, "R", value, "ohm", profile.ohms_accuracy(value, rng),
                            f"{format_value(rng.full_scale, 'ohm')} range", guard, junctions=flows,
                            current=rng.current)
    top = profile.ranges[-1]
    return BenchReading(profile.id, "R", None, "ohm", math.inf,
                        f"{format_value(top.full_scale, 'ohm')} range", guard)


def diode_drop(board: Board, a: str, b: str, profile: BenchProfile) -> BenchReading:
    """The multimeter's diode test from ``a`` (+) to ``b`` (-)."""
    _check_nets(board, a, b)
    setting = f"diode test, {format_value(profile.diode_current, 'A')}"
    volts, _, flows = _dc(board, a, b, None, current=profile.diode_current,
                          open_volts=profile.diode_open_volts)
    if volts is None:
        return BenchReading(profile.id, "Vf", None, "V", math.inf, setting)
    return BenchReading(profile.id, "Vf", volts, "V", profile.diode_accuracy(volts), setting,
                        junctions=flows, current=profile.diode_current)


def impedance(board: Board, a: str, b: str, profile: BenchProfile, frequency: float,
              guard: str | None = None) -> tuple[Equivalents, dict[str, float]]:
    """The LCR meter's impedance from ``a`` to ``b`` at ``frequency`` (Hz),
    and the peak test-signal voltage across each junction (forward sense)."""
    _check_nets(board, a, b, guard)
    net = Network(board, 2.0 * math.pi * frequency)
    z = net.impedance(a, b, guard)
    peaks: dict[str, float] = {}
    if net.junctions and net.index[a] != net.index[b]:
        fixed = {a: 1.0, b: 0.0} if guard is None else {a: 1.0, b: 0.0, guard: 0.0}
        v, _ = net.solve(fixed)
        # the meter's open-circuit level divides between its source and the board
        across = profile.level_volts * abs(z / (z + profile.source_ohms)) if math.isfinite(abs(z)) \
            else profile.level_volts
        for j in net.junctions:
            unit = abs(complex(net.volts(v, j.anode) - net.volts(v, j.cathode)))
            peaks[j.name] = math.sqrt(2.0) * across * unit
    return Equivalents.of(z, frequency), peaks


def lcr_reading(eq: Equivalents, quantity: str, profile: BenchProfile, guard: str | None = None,
                peaks: Mapping[str, float] | None = None) -> BenchReading:
    """One quantity (``"cp"``, ``"rs"`` ...) of an impedance as the meter shows it."""
    value = eq.value(quantity)
    rel = profile.lcr_relative(eq.z, eq.frequency, eq.d if quantity[0] in "cl" else eq.q)
    acc = abs(value) * rel if value is not None and math.isfinite(value) else math.inf
    mode = "series" if quantity.endswith("s") else "parallel"
    return BenchReading(profile.id, quantity, value if value is None or math.isfinite(value) else None,
                        LCR_QUANTITIES[quantity], acc, f"{format_value(eq.frequency, 'Hz')}, {mode} mode",
                        guard, eq.frequency, eq, dict(peaks or {}))
