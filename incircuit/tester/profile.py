"""The instrument profile: every hardware and method parameter of the tester.

A profile is a TOML file; the shipped default is
``incircuit/data/tester-default.toml``. Each value ``key = ...`` must have a
sibling ``key_source = "..."`` saying where the value comes from. Unknown
keys, missing keys, wrong types and out-of-range values raise
:class:`~incircuit.errors.ProfileError` naming the file and line.

The schema is the :class:`Profile` dataclass itself: each field's metadata
names its TOML table, key, type and allowed range.

>>> p = load_profile()
>>> p.supply_volts, p.adc_bits, p.probe_ohms(0, "low")
(5.0, 10, 680.0)
>>> from incircuit.model import Reading
>>> r = Reading("resistor", 1000.0, extra={"method": "divider", "resolution": 1.5})
>>> round(p.accuracy(r), 6)
13.0
"""

from __future__ import annotations

import math
import re
import tomllib
from dataclasses import dataclass, field, fields
from functools import lru_cache
from importlib import resources
from pathlib import Path
from types import MappingProxyType
from typing import Any, Mapping

from ..errors import ProfileError
from ..model import Reading

__all__ = ["Profile", "load_profile", "parse_profile", "METHODS", "DEFAULT_PROFILE"]

#: Measurement methods with a stated accuracy (``[accuracy.<method>]``).
METHODS = ("divider", "threshold_high", "threshold_low", "fixed_time", "current_rise", "junction")

#: Package-relative location of the shipped profile.
DEFAULT_PROFILE = ("data", "tester-default.toml")

_INF = math.inf


def _k(table: str, key: str, kind: type = float, lo: float = 0.0, hi: float = _INF,
       lo_open: bool = True):
    """A profile field read from ``[table] key``, of ``kind``, within (lo, hi]."""
    return field(metadata={"table": table, "key": key, "kind": kind, "lo": lo, "hi": hi,
                           "lo_open": lo_open})


@dataclass(frozen=True)
class Profile:
    """An immutable instrument profile (SI units; see the shipped TOML for notes)."""

    instrument_name: str = _k("instrument", "name", str)
    supply_volts: float = _k("supply", "volts", hi=100.0)
    adc_bits: int = _k("adc", "bits", int, lo=6, hi=24, lo_open=False)
    adc_full_scale_volts: float = _k("adc", "full_scale_volts", hi=100.0)
    adc_bandgap_volts: float = _k("adc", "bandgap_volts", hi=100.0)
    comparator_reference_volts: float = _k("comparator", "reference_volts", hi=100.0)
    port_high_ohms: float = _k("port", "high_ohms", lo_open=False)
    port_low_ohms: float = _k("port", "low_ohms", lo_open=False)
    port_stray_farads: float = _k("port", "stray_farads", lo_open=False, hi=1e-6)
    probe1_low_ohms: float = _k("probe1", "low_ohms")
    probe1_high_ohms: float = _k("probe1", "high_ohms")
    probe2_low_ohms: float = _k("probe2", "low_ohms")
    probe2_high_ohms: float = _k("probe2", "high_ohms")
    probe3_low_ohms: float = _k("probe3", "low_ohms")
    probe3_high_ohms: float = _k("probe3", "high_ohms")
    timer_tick_seconds: float = _k("timer", "tick_seconds", hi=1e-3)
    discharge_target_volts: float = _k("discharge", "target_volts", hi=1.0)
    discharge_direct_volts: float = _k("discharge", "direct_volts", hi=100.0)
    discharge_timeout_seconds: float = _k("discharge", "timeout_seconds", hi=60.0)
    conduction_low_seconds: float = _k("conduction", "low_seconds", hi=10.0)
    conduction_high_seconds: float = _k("conduction", "high_seconds", hi=10.0)
    conduction_hold_seconds: float = _k("conduction", "hold_seconds", hi=10.0)
    conduction_detect_counts: int = _k("conduction", "detect_counts", int, lo=1, hi=1000, lo_open=False)
    conduction_rise_fraction: float = _k("conduction", "rise_fraction", hi=1.0)
    conduction_rise_counts: int = _k("conduction", "rise_counts", int, lo=1, hi=1000, lo_open=False)
    conduction_hold_fraction: float = _k("conduction", "hold_fraction", hi=1.0)
    conduction_linear_tolerance: float = _k("conduction", "linear_tolerance", hi=1.0)
    resistance_settle_low_seconds: float = _k("resistance", "settle_low_seconds", hi=10.0)
    resistance_settle_high_seconds: float = _k("resistance", "settle_high_seconds", hi=10.0)
    resistance_max_ohms: float = _k("resistance", "max_ohms")
    resistance_symmetry_tolerance: float = _k("resistance", "symmetry_tolerance", hi=10.0)
    capacitance_size_seconds: float = _k("capacitance", "size_seconds", hi=1.0)
    capacitance_high_max_farads: float = _k("capacitance", "high_max_farads", hi=1.0)
    capacitance_low_max_farads: float = _k("capacitance", "low_max_farads", hi=10.0)
    capacitance_high_timeout_seconds: float = _k("capacitance", "high_timeout_seconds", hi=60.0)
    capacitance_low_timeout_seconds: float = _k("capacitance", "low_timeout_seconds", hi=60.0)
    capacitance_fixed_target_volts: float = _k("capacitance", "fixed_target_volts", hi=100.0)
    capacitance_fixed_first_seconds: float = _k("capacitance", "fixed_first_seconds", hi=60.0)
    capacitance_fixed_max_seconds: float = _k("capacitance", "fixed_max_seconds", hi=60.0)
    capacitance_read_seconds: float = _k("capacitance", "read_seconds", hi=1.0)
    capacitance_min_farads: float = _k("capacitance", "min_farads", lo_open=False, hi=1e-6)
    capacitance_zero_offset_farads: float = _k("capacitance", "zero_offset_farads", lo_open=False, hi=1e-6)
    capacitance_self_discharge_seconds: float = _k("capacitance", "self_discharge_seconds", hi=60.0)
    capacitance_esr_min_farads: float = _k("capacitance", "esr_min_farads", hi=10.0)
    capacitance_esr_sample_seconds: float = _k("capacitance", "esr_sample_seconds", hi=1.0)
    junction_capacitance_timeout_seconds: float = _k("junction", "capacitance_timeout_seconds", hi=60.0)
    inductance_max_ohms: float = _k("inductance", "max_ohms")
    inductance_margin: float = _k("inductance", "margin", lo=1.0, hi=100.0)
    inductance_timeout_seconds: float = _k("inductance", "timeout_seconds", hi=60.0)
    inductance_min_ticks: int = _k("inductance", "min_ticks", int, lo=1, hi=10**6, lo_open=False)
    accuracy_divider_relative: float = _k("accuracy.divider", "relative", lo_open=False, hi=1.0)
    accuracy_divider_counts: float = _k("accuracy.divider", "counts", lo_open=False, hi=1e6)
    accuracy_threshold_high_relative: float = _k("accuracy.threshold_high", "relative", lo_open=False, hi=1.0)
    accuracy_threshold_high_counts: float = _k("accuracy.threshold_high", "counts", lo_open=False, hi=1e6)
    accuracy_threshold_low_relative: float = _k("accuracy.threshold_low", "relative", lo_open=False, hi=1.0)
    accuracy_threshold_low_counts: float = _k("accuracy.threshold_low", "counts", lo_open=False, hi=1e6)
    accuracy_fixed_time_relative: float = _k("accuracy.fixed_time", "relative", lo_open=False, hi=1.0)
    accuracy_fixed_time_counts: float = _k("accuracy.fixed_time", "counts", lo_open=False, hi=1e6)
    accuracy_current_rise_relative: float = _k("accuracy.current_rise", "relative", lo_open=False, hi=1.0)
    accuracy_current_rise_counts: float = _k("accuracy.current_rise", "counts", lo_open=False, hi=1e6)
    accuracy_junction_relative: float = _k("accuracy.junction", "relative", lo_open=False, hi=1.0)
    accuracy_junction_counts: float = _k("accuracy.junction", "counts", lo_open=False, hi=1e6)
    #: ``"table.key"`` -> where the value comes from.
    sources: Mapping[str, str] = field(default_factory=dict, compare=False)
    path: str | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        object.__setattr__(self, "sources", MappingProxyType(dict(self.sources)))

    # -- views -------------------------------------------------------------
    @property
    def adc_counts(self) -> int:
        """Number of ADC codes, ``2**bits``."""
        return 1 << self.adc_bits

    def probe_ohms(self, probe: int, level: str) -> float:
        """Series resistor ``level`` ("low" or "high") of ``probe`` (0-based)."""
        return float(getattr(self, f"probe{probe + 1}_{level}_ohms"))

    def accuracy_figures(self, method: str) -> tuple[float, float]:
        """``(relative, counts)`` stated for ``method``."""
        if method not in METHODS:
            raise KeyError(method)
        return (getattr(self, f"accuracy_{method}_relative"), getattr(self, f"accuracy_{method}_counts"))

    def accuracy(self, reading: Reading) -> float:
        """Absolute uncertainty of ``reading.value`` as the instrument states it.

        ``relative * |value| + counts * resolution`` where the method and the
        resolution (the change of the value for one ADC count or timer tick,
        in the value's unit) come from ``reading.extra``. A reading without a
        value, or made by no method of this profile, has 0.
        """
        method = reading.extra.get("method")
        if reading.value is None or method not in METHODS:
            return 0.0
        relative, counts = self.accuracy_figures(str(method))
        resolution = float(reading.extra.get("resolution", 0.0) or 0.0)
        return relative * abs(reading.value) + counts * abs(resolution)


# -- loading ------------------------------------------------------------------

_SCHEMA = tuple(f for f in fields(Profile) if "table" in f.metadata)


def _line_of_key(text: str, table: str, key: str | None) -> int | None:
    """Line of ``[table]`` (key None) or of ``key = `` inside it."""
    current = ""
    header = re.compile(r"\s*\[\s*([^\]]+?)\s*\]\s*(#.*)?$")
    for no, line in enumerate(text.splitlines(), 1):
        found = header.match(line)
        if found:
            current = found.group(1).replace(" ", "").replace('"', "")
            if key is None and current == table:
                return no
            continue
        if key is not None and current == table and re.match(rf"\s*{re.escape(key)}\s*=", line):
            return no
    return None


def _decode_line(error: tomllib.TOMLDecodeError) -> int | None:
    found = re.search(r"line (\d+)", str(error))
    return int(found.group(1)) if found else None


def _tables(data: Mapping[str, Any], prefix: str = "") -> dict[str, dict[str, Any]]:
    """Flatten nested TOML tables: ``{"accuracy.divider": {...}}``."""
    out: dict[str, dict[str, Any]] = {}
    for name, value in data.items():
        full = f"{prefix}{name}"
        if isinstance(value, dict):
            leaves = {k: v for k, v in value.items() if not isinstance(v, dict)}
            if leaves or not any(isinstance(v, dict) for v in value.values()):
                out[full] = leaves
            out.update(_tables({k: v for k, v in value.items() if isinstance(v, dict)}, f"{full}."))
        else:
            out.setdefault("", {})[name] = value
    return out


def _check_value(f, value: Any, where) -> Any:
    meta = f.metadata
    kind, key = meta["kind"], f"{meta['table']}.{meta['key']}"
    if kind is str:
        if not isinstance(value, str) or not value.strip():
            raise ProfileError(f"'{key}' must be a non-empty string, not {value!r}", *where)
        return value
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ProfileError(f"'{key}' must be a number, not {value!r}", *where)
    if kind is int and (not isinstance(value, int)):
        raise ProfileError(f"'{key}' must be a whole number, not {value!r}", *where)
    lo, hi = meta["lo"], meta["hi"]
    low_ok = value > lo if meta["lo_open"] else value >= lo
    if not (math.isfinite(value) and low_ok and value <= hi):
        bracket = "(" if meta["lo_open"] else "["
        raise ProfileError(f"'{key}' = {value!r} is out of range {bracket}{lo:g}, {hi:g}]", *where)
    return kind(value)


def _cross_checks(p: Profile, text: str, path: str) -> None:
    """Relations between values that each field alone cannot check."""
    def fail(message: str, table: str, key: str) -> None:
        raise ProfileError(message, path, _line_of_key(text, table, key))

    if p.adc_bandgap_volts >= p.adc_full_scale_volts:
        fail("'adc.bandgap_volts' must be below 'adc.full_scale_volts'", "adc", "bandgap_volts")
    if p.comparator_reference_volts >= p.supply_volts:
        fail("'comparator.reference_volts' must be below 'supply.volts'", "comparator", "reference_volts")
    for n in (1, 2, 3):
        if p.probe_ohms(n - 1, "low") >= p.probe_ohms(n - 1, "high"):
            fail(f"'probe{n}.low_ohms' must be below 'probe{n}.high_ohms'", f"probe{n}", "low_ohms")
    if p.capacitance_high_max_farads >= p.capacitance_low_max_farads:
        fail("'capacitance.high_max_farads' must be below 'capacitance.low_max_farads'",
             "capacitance", "high_max_farads")
    if p.capacitance_fixed_target_volts >= p.supply_volts:
        fail("'capacitance.fixed_target_volts' must be below 'supply.volts'", "capacitance", "fixed_target_volts")
    if p.discharge_target_volts >= p.discharge_direct_volts:
        fail("'discharge.target_volts' must be below 'discharge.direct_volts'", "discharge", "target_volts")


def parse_profile(text: str, path: str = "<text>") -> Profile:
    """The profile written in ``text`` (``path`` names it in errors)."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise ProfileError(f"not valid TOML: {error}", path, _decode_line(error)) from None
    tables = _tables(data)
    known: dict[str, set[str]] = {}
    for f in _SCHEMA:
        known.setdefault(f.metadata["table"], set()).update({f.metadata["key"], f"{f.metadata['key']}_source"})
    for table, entries in tables.items():
        if table not in known:
            line = _line_of_key(text, table, None) if table else _line_of_key(text, "", next(iter(entries)))
            what = f"table [{table}]" if table else f"key '{next(iter(entries))}' outside any table"
            raise ProfileError(f"unknown {what} (known tables: {', '.join(sorted(known))})", path, line)
        for key in entries:
            if key not in known[table]:
                raise ProfileError(f"unknown key '{key}' in [{table}]", path, _line_of_key(text, table, key))
    values: dict[str, Any] = {}
    sources: dict[str, str] = {}
    for f in _SCHEMA:
        table, key = f.metadata["table"], f.metadata["key"]
        entries = tables.get(table, {})
        if key not in entries:
            line = _line_of_key(text, table, None)
            raise ProfileError(f"missing '{key}' in [{table}]", path, line)
        where = (path, _line_of_key(text, table, key))
        values[f.name] = _check_value(f, entries[key], where)
        source = entries.get(f"{key}_source")
        if not isinstance(source, str) or not source.strip():
            raise ProfileError(f"missing '{key}_source' in [{table}]: say where '{key}' comes from", *where)
        sources[f"{table}.{key}"] = source
    profile = Profile(**values, sources=sources, path=path)
    _cross_checks(profile, text, path)
    return profile


@lru_cache(maxsize=1)
def _default_profile() -> Profile:
    item = resources.files("incircuit").joinpath(*DEFAULT_PROFILE)
    return parse_profile(item.read_text(encoding="utf-8"), str(item))


def load_profile(path: str | None = None) -> Profile:
    """The profile in the TOML file at ``path``; None gives the shipped default."""
    if path is None:
        return _default_profile()
    try:
        text = Path(path).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as error:
        reason = getattr(error, "strerror", None) or str(error)
        raise ProfileError(f"cannot read profile: {reason}", path, None) from None
    return parse_profile(text, path)
