"""The tester's hardware as the identification sees it: drives, ADC, timer, steps.

A :class:`Bench` wraps an engine Session. Every step goes through
:meth:`Bench.run`, which simulates it, keeps a :class:`StepRecord` and moves
the tester's clock on. Readings are quantised the way the instrument
quantises them:

* the ADC floors a voltage to a count of ``full_scale / 2**bits``, or of
  ``bandgap / 2**bits`` when the voltage is below the band-gap reference
  (the tester re-reads small voltages against it); negative voltages read 0;
* the timer floors a time to whole ticks.

>>> from incircuit.tester.profile import load_profile
>>> p = load_profile()
>>> read_adc(p, 0.5).count, read_adc(p, 3.0).count, read_adc(p, 9.0).count
(465, 614, 1023)
>>> ticks(p, 1e-6)
16
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Sequence

import numpy as np

from ..engines.base import Drive, Session, Source, StepResult, Watch
from .profile import Profile

__all__ = ["AdcReading", "StepRecord", "Bench", "read_adc", "ticks", "describe_drive", "RAILS", "VIAS"]

#: Where a driven probe is tied: the supply ("high") or the tester's 0 V ("low").
RAILS = ("high", "low")
#: Through what: the bare port pin, or the low or high series resistor.
VIAS = ("port", "low", "high")


@dataclass(frozen=True)
class AdcReading:
    """One ADC conversion: the voltage as read, the code and one count in volts."""

    volts: float
    count: int
    lsb: float


def read_adc(profile: Profile, volts: float) -> AdcReading:
    """``volts`` as the tester's ADC reads it (auto-ranging to the band-gap)."""
    n = profile.adc_counts
    reference = profile.adc_bandgap_volts if volts < profile.adc_bandgap_volts else profile.adc_full_scale_volts
    lsb = reference / n
    if not math.isfinite(volts) or volts <= 0.0:
        return AdcReading(0.0, 0, lsb)
    count = min(int(math.floor(volts / lsb)), n - 1)
    return AdcReading(count * lsb, count, lsb)


def ticks(profile: Profile, seconds: float) -> int:
    """Whole timer ticks in ``seconds`` (floored)."""
    return int(math.floor(seconds / profile.timer_tick_seconds + 1e-9))


def describe_drive(profile: Profile, drive: Drive) -> str:
    """Where each probe is tied, in words (probes numbered from 1).

    >>> from incircuit.tester.profile import load_profile
    >>> from incircuit.engines.base import Source
    >>> describe_drive(load_profile(), (Source(702.0, 5.0), Source(20.0, 0.0), None))
    '1: supply via low resistor; 2: 0 V via port; 3: floating'
    """
    words = []
    for i, src in enumerate(drive):
        if src is None:
            words.append(f"{i + 1}: floating")
            continue
        high = src.volts > 0
        port = profile.port_high_ohms if high else profile.port_low_ohms
        via = f"{src.resistance:g} ohm"
        options = {"port": port}
        if i < 3:
            options.update({f"{v} resistor": port + profile.probe_ohms(i, v) for v in ("low", "high")})
        for name, ohms in options.items():
            if math.isclose(src.resistance, ohms, rel_tol=1e-9):
                via = name
        words.append(f"{i + 1}: {'supply' if high else '0 V'} via {via}")
    return "; ".join(words)


@dataclass(frozen=True)
class StepRecord:
    """One executed step of an identification run.

    ``drive`` is the engine drive (one Source or None per probe), ``result``
    the engine's StepResult, ``t_start`` the tester time (s) when the step
    began; ``sample_times`` (relative to ``t_start``) are the rows of
    ``result.samples``. ``sampled`` and ``formula`` say what the tester
    reads in the step and what it computes from it; ``wiring`` says where
    each probe is tied, in words.
    """

    name: str
    drive: Drive
    result: StepResult
    t_start: float
    sample_times: tuple[float, ...] = ()
    watch: Watch | None = None
    sampled: str = ""
    formula: str = ""
    #: The drive in words, e.g. "1: supply via low resistor; 2: 0 V via port".
    wiring: str = ""

    @property
    def t_end(self) -> float:
        return self.t_start + self.result.duration

    def at(self, t: float) -> tuple[float, ...]:
        """Probe voltages at ``t`` (one of ``sample_times``) after the start."""
        i = int(np.argmin(np.abs(np.asarray(self.sample_times) - t)))
        if not self.sample_times or abs(self.sample_times[i] - t) > 1e-12 + 1e-9 * t:
            raise KeyError(f"{t} s is not a sample time of step {self.name!r}")
        return tuple(float(v) for v in self.result.samples[i])


def _trace_times(duration: float, points: int) -> list[float]:
    """About ``points`` sample times over a step: half linear, half logarithmic."""
    if points <= 0 or duration <= 0:
        return []
    half = max(points // 2, 1)
    lin = np.linspace(duration / half, duration, half)
    log = np.geomspace(duration * 1e-3, duration, points - half) if points > half else np.zeros(0)
    return [float(t) for t in np.concatenate([lin, log])]


@dataclass
class Bench:
    """The tester attached to a board through an engine session (mutable)."""

    session: Session
    profile: Profile
    trace_points: int = 16
    time: float = 0.0
    records: list[StepRecord] = field(default_factory=list)

    @property
    def n_probes(self) -> int:
        return len(self.session.probe_nets)

    # -- drives --------------------------------------------------------------
    def source(self, probe: int, rail: str, via: str) -> Source:
        """Probe ``probe`` tied to ``rail`` through ``via`` (see RAILS, VIAS)."""
        p = self.profile
        port = p.port_high_ohms if rail == "high" else p.port_low_ohms
        series = 0.0 if via == "port" else p.probe_ohms(probe, via)
        return Source(port + series, p.supply_volts if rail == "high" else 0.0)

    def drive(self, spec: dict[int, tuple[str, str]]) -> Drive:
        """A drive from ``{probe: (rail, via)}``; probes not named float."""
        return tuple(self.source(i, *spec[i]) if i in spec else None for i in range(self.n_probes))

    # -- steps ---------------------------------------------------------------
    def run(
        self,
        name: str,
        drive: Drive,
        duration: float,
        *,
        watch: Watch | None = None,
        at: Sequence[float] = (),
        sampled: str = "",
        formula: str = "",
    ) -> StepRecord:
        """Simulate one step; ``at`` are times the tester itself samples."""
        times = sorted(set(_trace_times(duration, self.trace_points)) | {float(t) for t in at})
        result = self.session.run(drive, duration, watch=watch, sample_times=times)
        record = StepRecord(name, drive, result, self.time, tuple(times), watch, sampled, formula,
                            describe_drive(self.profile, drive))
        self.records.append(record)
        self.time += result.duration
        return record

    # -- instrument ----------------------------------------------------------
    def adc(self, volts: float) -> AdcReading:
        return read_adc(self.profile, volts)

    def full_count(self) -> int:
        """The code the ADC gives for the supply voltage."""
        return read_adc(self.profile, self.profile.supply_volts).count

    def ticks(self, seconds: float) -> int:
        return ticks(self.profile, seconds)
