"""Profiles of common bench instruments, read from editable TOML files.

Two kinds are modelled; every number lives in the TOML, none in code:

``multimeter``
    A resistance range with a low test voltage: a constant test current
    per range, an open-circuit voltage below about 0.3 V so silicon
    junctions stay off (a low-power resistance function, common practice),
    and a diode-test function (a constant current with a few volts of
    compliance). Accuracy ``relative * reading + counts * resolution``.
``lcr``
    An LCR meter: a sine test signal of ``level_volts`` (rms) through
    ``source_ohms`` at each of ``frequencies``; optional guard terminal.
    Accuracy ``basic * (1 + Zshort/|Z| + |Z| * w * Copen)`` relative,
    times ``sqrt(1 + D^2)`` (the usual shape of an LCR meter's accuracy
    chart, common practice; the residuals are the meter's short- and
    open-circuit residuals).

The shipped profiles are ``incircuit/data/instruments/*.toml`` files with
an ``[instrument]`` table whose ``kind`` is one of the above.

>>> [p.id for p in bench_profiles()]
['lcr-meter', 'multimeter-low-ohms']
"""

from __future__ import annotations

import math
import re
import tomllib
from dataclasses import dataclass
from importlib import resources
from pathlib import Path
from typing import Any, Mapping

from ..errors import ProfileError

__all__ = ["OhmRange", "BenchProfile", "load_bench_profile", "bench_profiles", "BENCH_KINDS"]

BENCH_KINDS = ("multimeter", "lcr")


@dataclass(frozen=True)
class OhmRange:
    """One resistance range: full scale (ohm) and its test current (A)."""

    full_scale: float
    current: float


@dataclass(frozen=True)
class BenchProfile:
    """A bench instrument: identity, model parameters and accuracy."""

    id: str
    name: str
    kind: str
    description: str
    guard: bool
    # multimeter
    ranges: tuple[OhmRange, ...] = ()
    open_volts: float = 0.0
    relative: float = 0.0
    counts: float = 0.0
    display_counts: float = 2000.0
    diode_current: float = 0.0
    diode_open_volts: float = 0.0
    diode_resolution: float = 1e-3
    # LCR meter
    frequencies: tuple[float, ...] = ()
    level_volts: float = 0.0
    source_ohms: float = 0.0
    basic: float = 0.0
    short_ohms: float = 0.0
    open_farads: float = 0.0
    path: str | None = None

    def ohms_accuracy(self, value: float, rng: OhmRange) -> float:
        """Absolute uncertainty of a resistance reading on range ``rng``."""
        return self.relative * abs(value) + self.counts * rng.full_scale / self.display_counts

    def diode_accuracy(self, volts: float) -> float:
        return self.relative * abs(volts) + self.counts * self.diode_resolution

    def lcr_relative(self, z: complex, frequency: float, d: float = 0.0) -> float:
        """Relative uncertainty of the primary value read from impedance ``z``."""
        mag = abs(z)
        if mag == 0 or not math.isfinite(mag):
            return math.inf
        w = 2.0 * math.pi * frequency
        spread = 1.0 + self.short_ohms / mag + mag * w * self.open_farads
        return self.basic * spread * math.sqrt(1.0 + (d if math.isfinite(d) else 0.0) ** 2)


def _line_of(error: tomllib.TOMLDecodeError) -> int | None:
    found = re.search(r"line (\d+)", str(error))
    return int(found.group(1)) if found else None


def _line_with(text: str, key: str) -> int | None:
    for no, line in enumerate(text.splitlines(), 1):
        if re.match(rf"\s*{re.escape(key)}\s*=", line) or line.strip() == f"[{key}]":
            return no
    return None


def _number(table: Mapping[str, Any], key: str, path: str, text: str, positive: bool = True) -> float:
    if key not in table:
        raise ProfileError(f"missing '{key}'", path, None)
    value = table[key]
    if isinstance(value, bool) or not isinstance(value, (int, float)) or (positive and value <= 0):
        raise ProfileError(f"'{key}' must be a positive number, not {value!r}", path, _line_with(text, key))
    return float(value)


def _parse(text: str, path: str) -> BenchProfile | None:
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise ProfileError(f"not valid TOML: {error}", path, _line_of(error)) from None
    head = data.get("instrument")
    if not isinstance(head, dict) or head.get("kind") not in BENCH_KINDS:
        return None
    kind = head["kind"]
    common = dict(id=str(head.get("id", Path(path).stem)), name=str(head.get("name", Path(path).stem)),
                  kind=kind, description=str(head.get("description", "")),
                  guard=bool(head.get("guard", False)), path=path)
    if kind == "multimeter":
        ohm = data.get("resistance")
        diode = data.get("diode_test", {})
        if not isinstance(ohm, dict) or not isinstance(diode, dict):
            raise ProfileError("a multimeter needs a [resistance] table", path, None)
        raw = ohm.get("ranges")
        if not isinstance(raw, list) or not raw:
            raise ProfileError("[resistance] needs a non-empty 'ranges' list", path, _line_with(text, "resistance"))
        ranges = []
        for item in raw:
            if not isinstance(item, dict):
                raise ProfileError("each range is {full_scale = ..., current = ...}", path, _line_with(text, "ranges"))
            ranges.append(OhmRange(_number(item, "full_scale", path, text), _number(item, "current", path, text)))
        return BenchProfile(
            **common, ranges=tuple(sorted(ranges, key=lambda r: r.full_scale)),
            open_volts=_number(ohm, "open_volts", path, text),
            relative=_number(ohm, "relative", path, text, positive=False),
            counts=_number(ohm, "counts", path, text, positive=False),
            display_counts=_number(ohm, "display_counts", path, text),
            diode_current=_number(diode, "current", path, text) if diode else 0.0,
            diode_open_volts=_number(diode, "open_volts", path, text) if diode else 0.0,
            diode_resolution=_number(diode, "resolution", path, text) if diode else 1e-3,
        )
    lcr = data.get("lcr")
    if not isinstance(lcr, dict):
        raise ProfileError("an LCR meter needs an [lcr] table", path, None)
    freqs = lcr.get("frequencies")
    if not isinstance(freqs, list) or not freqs or not all(
            isinstance(f, (int, float)) and not isinstance(f, bool) and f > 0 for f in freqs):
        raise ProfileError("'frequencies' must be a list of positive numbers (Hz)", path,
                           _line_with(text, "frequencies"))
    return BenchProfile(
        **common, frequencies=tuple(float(f) for f in freqs),
        level_volts=_number(lcr, "level_volts", path, text),
        source_ohms=_number(lcr, "source_ohms", path, text),
        basic=_number(lcr, "basic", path, text),
        short_ohms=_number(lcr, "short_ohms", path, text, positive=False),
        open_farads=_number(lcr, "open_farads", path, text, positive=False),
    )


def load_bench_profile(path: str) -> BenchProfile:
    """The bench instrument described by the TOML file at ``path``."""
    try:
        text = Path(path).read_text(encoding="utf-8")
    except OSError as error:
        raise ProfileError(f"cannot read: {error.strerror}", path, None) from None
    profile = _parse(text, path)
    if profile is None:
        raise ProfileError(f"no [instrument] table with kind one of {', '.join(BENCH_KINDS)}", path, 1)
    return profile


def bench_profiles() -> tuple[BenchProfile, ...]:
    """The shipped bench instrument profiles, sorted by id."""
    folder = resources.files("incircuit").joinpath("data", "instruments")
    found = []
    if folder.is_dir():
        for item in folder.iterdir():
            if item.name.endswith(".toml"):
                profile = _parse(item.read_text(encoding="utf-8"), str(item))
                if profile is not None:
                    found.append(profile)
    return tuple(sorted(found, key=lambda p: p.id))
