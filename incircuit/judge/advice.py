"""Instrument advice: which bench instrument reads the part in circuit.

For each shipped bench profile (:mod:`incircuit.bench`) the part is
"measured" on the whole board between the probed nets and the reading is
compared with what the part itself should show:

* R, C, L: the part's value, inside its tolerance widened by the
  instrument's accuracy. A multimeter reads resistors (both polarities
  must agree); an LCR meter reads R, C and L at each of its frequencies in
  series and parallel mode, and the best setting is given.
* D: the multimeter's diode test, against the same test on the diode
  alone, inside ``READING_TOLERANCE`` plus the accuracy.

A reading inside the window must also follow the part: its sensitivity
(the part's value +10 %, or a diode's saturation current x4 referred to its
own reading) must reach ``BENCH_MIN_SENSITIVITY``, so that a match made by
the parts around it by coincidence is not called reliable. An LCR reading
is not trusted when the test signal drives a junction past its turn-on
voltage (its voltage at ``CONDUCTING_CURRENT``): the small-signal model no
longer holds. A multimeter's Shockley currents are in its reading already;
junctions carrying more than ``METER_JUNCTION_SHARE`` of the test current
are named as a note, and the two polarities must agree.

Where the instrument has a guard terminal and the unguarded reading is not
reliable, every net in the middle of a path beside the part is tried as
the guard (held at the low probe's potential): the first that makes the
reading reliable is named.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, Sequence

from ..bench import (
    BenchProfile, BenchReading, Equivalents, bench_profiles, diode_drop, impedance, lcr_reading, ohms,
)
from ..bench.junctions import junctions
from ..circuit import elements
from ..errors import EngineError
from ..graph import between
from ..model import Board, Part
from ..units import format_value
from ..units import format_value
from .band import part_tolerance
from .runs import with_model_param
from .thresholds import (
    BENCH_MAX_RELATIVE_UNCERTAINTY, BENCH_MIN_SENSITIVITY, CONDUCTING_CURRENT, MAX_GUARD_NETS, METER_JUNCTION_SHARE,
    PERTURBATION, SEMICONDUCTOR_PARAMETER,
)

__all__ = ["Advice", "advise", "guard_nets"]

_QUANTITIES = {"R": ("rs", "rp"), "C": ("cp", "cs"), "L": ("ls", "lp")}


@dataclass(frozen=True)
class Advice:
    """One bench instrument's reading of the part and whether it is reliable."""

    instrument: str
    name: str
    reading: BenchReading
    expected: float | None
    low: float | None
    high: float | None
    reliable: bool
    caveats: tuple[str, ...]
    text: str

    def to_dict(self) -> dict:
        return {"instrument": self.instrument, "name": self.name, "reading": self.reading.to_dict(),
                "expected": self.expected, "low": self.low, "high": self.high,
                "reliable": self.reliable, "guard": self.reading.guard,
                "caveats": list(self.caveats), "text": self.text}


def guard_nets(board: Board, part: str, a: str, b: str, limit: int = MAX_GUARD_NETS) -> list[str]:
    """Nets in the middle of the paths beside ``part`` between ``a`` and ``b``."""
    found: dict[str, None] = {}
    for path in between(board, a, b, without=(part,)).paths:
        for net in path.nets[1:-1]:
            found.setdefault(net, None)
    return list(found)[:limit]


def _meter_notes(reading: BenchReading, own: str) -> list[str]:
    """Junctions that carry a noticeable share of a multimeter's test current
    (their Shockley current is in the reading already)."""
    out = []
    current = reading.current or 0.0
    for name, amps in sorted(reading.junctions.items(), key=lambda kv: -kv[1]):
        if amps > METER_JUNCTION_SHARE * current and not name.startswith(own + " ") and name != own:
            out.append(f"{name} carries {amps / current * 100:.0f} % of the test current")
    return out


def _lcr_caveats(board: Board, peaks: dict, own: str) -> list[str]:
    """Junctions the LCR test signal drives past turn-on: the small-signal
    model no longer holds, so such a reading is not trusted."""
    out = []
    for j in junctions(elements(board)):
        peak = peaks.get(j.name, 0.0)
        turn_on = j.turn_on(CONDUCTING_CURRENT)
        if j.part != own and peak >= turn_on:
            out.append(f"the test signal swings {j.name} to {format_value(peak, 'V', 2)}, past its "
                       f"turn-on ({format_value(turn_on, 'V', 2)}): the reading includes its conduction")
    return out


def _judge(profile: BenchProfile, part: Part, reading: BenchReading, expected: float | None,
           tol: tuple[float, float], caveats: Sequence[str], notes: Sequence[str] = (),
           follows: Callable[[], float | None] | None = None) -> Advice:
    """The advice for one reading: inside the window, no blocking caveat, and
    (checked last, it costs a solve) a sensitivity of at least
    ``BENCH_MIN_SENSITIVITY`` from ``follows``."""
    caveats = list(caveats)
    if reading.value is None or expected is None or not math.isfinite(reading.accuracy):
        low = high = None
        ok = False
    else:
        if reading.accuracy > BENCH_MAX_RELATIVE_UNCERTAINTY * abs(expected):
            caveats.append(f"its accuracy here (+-{format_value(reading.accuracy, reading.unit)}) is too wide "
                           f"to judge {part.name}")
        low = expected * (1 - tol[0]) - reading.accuracy
        if expected >= 0:
            low = max(low, 0.0)  # an expected ohm, farad or henry value: the window starts at zero
        high = expected * (1 + tol[1]) + reading.accuracy
        ok = low <= reading.value <= high and not caveats
        if ok and follows is not None:
            s = follows()
            if s is None or s < BENCH_MIN_SENSITIVITY:
                ok = False
                shown = "no" if s is None else f"{s:.2f}"
                caveats.append(f"it follows {part.name} only weakly (sensitivity {shown}): the match "
                               f"is a coincidence of the parts around it")
    unit = reading.unit
    if expected is not None and low is not None:
        span = f"expected {format_value(expected, unit)}, window {format_value(low, unit)} .. " \
               f"{format_value(high, unit)}"
    else:
        span = f"expected {format_value(expected, unit)}"
    verdict = f"reads {part.name} reliably in circuit" if ok else f"does not read {part.name} in circuit"
    text = f"{profile.name}: {reading.describe()} ({span}): {verdict}"
    if caveats or notes:
        text += "; " + "; ".join([*caveats, *notes])
    return Advice(profile.id, profile.name, reading, expected, low, high, ok,
                  tuple([*caveats, *notes]), text)


def _best(options: list[Advice]) -> Advice | None:
    def distance(a: Advice) -> float:
        if a.reading.value is None or not a.expected:
            return math.inf
        return abs(a.reading.value - a.expected) / abs(a.expected)
    return min(options, key=lambda a: (not a.reliable, distance(a)), default=None)


def _ratio(now: float | None, then: float | None, step: float) -> float | None:
    if now is None or then is None or now == 0:
        return None
    return (then - now) / now / step


def _bumped(board: Board, part: Part) -> Board:
    return board.with_part(part.with_value(float(part.value) * (1 + PERTURBATION)))  # type: ignore[arg-type]


def _ohms_advice(profile: BenchProfile, board: Board, part: Part, a: str, b: str, guard: str | None,
                 tol: tuple[float, float]) -> Advice:
    fwd, rev = ohms(board, a, b, profile, guard), ohms(board, b, a, profile, guard)
    notes = list(dict.fromkeys(_meter_notes(fwd, part.name) + _meter_notes(rev, part.name)))
    caveats = []
    if rev.value is None or fwd.value is None or abs(rev.value - fwd.value) > fwd.accuracy + rev.accuracy:
        caveats.append(f"the reverse polarity reads {format_value(rev.value, 'ohm')}")
    return _judge(profile, part, fwd, part.value, tol, caveats, notes, lambda: _ratio(
        fwd.value, ohms(_bumped(board, part), a, b, profile, guard).value, PERTURBATION))


def _diode_advice(profile: BenchProfile, board: Board, part: Part, tol: tuple[float, float]) -> Advice:
    anode, cathode = part.pins[0], part.pins[1]
    alone = diode_drop(board.only(part.name), anode, cathode, profile)
    here = diode_drop(board, anode, cathode, profile)

    def follows() -> float | None:
        key, default, factor = SEMICONDUCTOR_PARAMETER["D"]
        model = board.models.get(part.model or "")
        base = float(model.params.get(key, default)) if model is not None else default
        changed = with_model_param(board, part.name, key, base * factor)
        ratio_alone = _ratio(alone.value, diode_drop(changed.only(part.name), anode, cathode, profile).value, 1)
        ratio_here = _ratio(here.value, diode_drop(changed, anode, cathode, profile).value, 1)
        return None if not ratio_alone or ratio_here is None else ratio_here / ratio_alone

    return _judge(profile, part, here, alone.value, tol, [], _meter_notes(here, part.name), follows)


def _lcr_advice(profile: BenchProfile, board: Board, part: Part, a: str, b: str, guard: str | None,
                tol: tuple[float, float]) -> Advice | None:
    options = []
    for f in profile.frequencies:
        eq, peaks = impedance(board, a, b, profile, f, guard)
        caveats = _lcr_caveats(board, peaks, part.name)
        bumped: list[Equivalents] = []

        def follows(q: str, eq: Equivalents = eq, f: float = f, bumped: list = bumped) -> float | None:
            if not bumped:
                bumped.append(impedance(_bumped(board, part), a, b, profile, f, guard)[0])
            return _ratio(eq.value(q), bumped[0].value(q), PERTURBATION)

        for q in _QUANTITIES[part.kind]:
            options.append(_judge(profile, part, lcr_reading(eq, q, profile, guard, peaks), part.value,
                                  tol, caveats, (), lambda q=q, follows=follows: follows(q)))
    return _best(options)


def _measure(profile: BenchProfile, board: Board, part: Part, a: str, b: str,
             guard: str | None) -> Advice | None:
    tol = part_tolerance(part)[:2]
    if guard is not None and not profile.guard:
        return None
    if profile.kind == "multimeter" and part.kind == "R" and part.value:
        return _ohms_advice(profile, board, part, a, b, guard, tol)
    if profile.kind == "multimeter" and part.kind == "D" and guard is None and len(part.pins) == 2:
        return _diode_advice(profile, board, part, tol)
    if profile.kind == "lcr" and part.kind in _QUANTITIES and part.value:
        return _lcr_advice(profile, board, part, a, b, guard, tol)
    return None


def advise(board: Board, part: str, probes: Sequence[str],
           profiles: Sequence[BenchProfile] | None = None) -> list[Advice]:
    """Each bench instrument's best reading of ``part`` on the board, with a
    guarded reading added where the plain one is not reliable; reliable
    advice first."""
    p = board.part(part)
    nets = list(dict.fromkeys(probes))
    a, b = (nets[0], nets[1]) if len(nets) >= 2 else (p.pins[0], p.pins[-1])
    out: list[Advice] = []
    for profile in profiles if profiles is not None else bench_profiles():
        try:
            plain = _measure(profile, board, p, a, b, None)
            if plain is None:
                continue
            out.append(plain)
            if plain.reliable or not profile.guard:
                continue
            guarded = [g for g in (_measure(profile, board, p, a, b, net)
                                   for net in guard_nets(board, p.name, a, b)) if g is not None]
            best = _best(guarded)
            if best is not None and best.reliable:
                out.append(best)
        except EngineError:
            continue
    return sorted(out, key=lambda x: not x.reliable)
