"""The data model at the centre of incircuit: Board, Part, Model, Reading.

Plain immutable data in SI units. This module imports no other module of
the package; everything else (graph, engines, tester, judge, reports) is a
view computed from a :class:`Board`.

Names are case-insensitive in SPICE; the importer stores part, model and net
names upper-case so that comparisons are plain string equality. Net ``"0"``
is an ordinary net here: the board floats relative to any instrument.

>>> r = Part("R1", "R", ("A", "B"), value=10e3)
>>> b = Board("demo", (r,))
>>> b.nets
('A', 'B')
>>> b.lifted("R1", 2).part("R1").pins
('A', 'R1.PIN2~LIFTED')
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from types import MappingProxyType
from typing import Mapping

__all__ = [
    "Location",
    "Tolerance",
    "Model",
    "Part",
    "Board",
    "Reading",
    "TWO_TERMINAL_KINDS",
    "READING_KINDS",
    "READING_UNITS",
]

#: Part kinds with two pins whose value is a single number.
TWO_TERMINAL_KINDS = ("R", "C", "L")

#: Every kind a reading can have (three-terminal kinds join later).
READING_KINDS = (
    "resistor",
    "capacitor",
    "inductor",
    "diode",
    "diode-pair",
    "nothing",
    "unreadable",
    "bjt-npn",
    "bjt-pnp",
    "mosfet-n-enh",
    "mosfet-p-enh",
    "mosfet-n-dep",
    "mosfet-p-dep",
    "jfet-n",
    "jfet-p",
)

#: The unit of the primary value of each reading kind (None: no value).
READING_UNITS: Mapping[str, str | None] = MappingProxyType(
    {
        "resistor": "ohm",
        "capacitor": "F",
        "inductor": "H",
        "diode": "V",
        "diode-pair": "V",
        "nothing": None,
        "unreadable": None,
        "bjt-npn": "1",
        "bjt-pnp": "1",
        "mosfet-n-enh": "V",
        "mosfet-p-enh": "V",
        "mosfet-n-dep": "V",
        "mosfet-p-dep": "V",
        "jfet-n": "V",
        "jfet-p": "V",
    }
)


def _frozen(mapping: Mapping | None) -> Mapping:
    return MappingProxyType(dict(mapping or {}))


@dataclass(frozen=True)
class Location:
    """Where something came from: a file path and a 1-based line number."""

    path: str
    line: int

    def __str__(self) -> str:
        return f"{self.path}:{self.line}"


@dataclass(frozen=True)
class Tolerance:
    """Allowed relative deviation of a part's value: ``-minus`` .. ``+plus``.

    >>> Tolerance.symmetric(0.05).band(100.0)
    (95.0, 105.0)
    """

    minus: float
    plus: float
    #: "netlist" when written on the part's line, else "default".
    origin: str = "netlist"

    @classmethod
    def symmetric(cls, fraction: float, origin: str = "netlist") -> "Tolerance":
        return cls(fraction, fraction, origin)

    def band(self, value: float) -> tuple[float, float]:
        return (value * (1.0 - self.minus), value * (1.0 + self.plus))


@dataclass(frozen=True)
class Model:
    """A ``.model`` card: name, SPICE type (D, NPN, PNP, NMOS, PMOS, NJF, PJF)
    and its parameters (lower-case keys, SI values)."""

    name: str
    type: str
    params: Mapping[str, float] = field(default_factory=dict)
    location: Location | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "params", _frozen(self.params))


@dataclass(frozen=True)
class Part:
    """One element of the board.

    kind
        SPICE letter: R C L K D Q M J, or X for an instance whose subcircuit
        is not defined (an unmodelled part: chip, connector, fuse ...).
    pins
        Net names in SPICE pin order (R/C/L/D: 2; Q: C B E [S]; M: D G S B;
        J: D G S; K: none, its inductors are in ``params["inductors"]``).
    value
        ohm, F, H for R/C/L; the coupling coefficient for K; None otherwise.
    model
        ``.model`` name for D/Q/M/J, subcircuit name for an unmodelled X.
    params
        Instance parameters (lower-case keys), e.g. ``area``, ``ic``, and
        annotations from the line's comment such as ``esr``.
    """

    name: str
    kind: str
    pins: tuple[str, ...]
    value: float | None = None
    model: str | None = None
    params: Mapping[str, object] = field(default_factory=dict)
    tolerance: Tolerance | None = None
    location: Location | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "pins", tuple(self.pins))
        object.__setattr__(self, "params", _frozen(self.params))

    def with_value(self, value: float) -> "Part":
        return replace(self, value=value)


@dataclass(frozen=True)
class Board:
    """A whole board: its parts and the ``.model`` cards they use.

    The nets, the graph and every matrix are computed from this, never
    stored beside it. Changes (a fault, a lifted leg, a what-if value)
    return a new Board.
    """

    name: str
    parts: tuple[Part, ...]
    models: Mapping[str, Model] = field(default_factory=dict)
    notes: tuple[str, ...] = ()
    path: str | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "parts", tuple(self.parts))
        object.__setattr__(self, "models", _frozen(self.models))
        object.__setattr__(self, "notes", tuple(self.notes))

    # -- views -------------------------------------------------------------
    @property
    def nets(self) -> tuple[str, ...]:
        """Every net that a part touches, sorted."""
        return tuple(sorted({n for p in self.parts for n in p.pins}))

    def part(self, name: str) -> Part:
        """The part called ``name`` (case-insensitive); KeyError if absent."""
        key = name.upper()
        for p in self.parts:
            if p.name == key:
                return p
        raise KeyError(name)

    def has_part(self, name: str) -> bool:
        key = name.upper()
        return any(p.name == key for p in self.parts)

    def parts_on(self, net: str) -> tuple[Part, ...]:
        return tuple(p for p in self.parts if net in p.pins)

    # -- changed copies ----------------------------------------------------
    def with_part(self, part: Part) -> "Board":
        """A copy with ``part`` replacing the part of the same name (or added)."""
        parts = [p for p in self.parts if p.name != part.name]
        index = next((i for i, p in enumerate(self.parts) if p.name == part.name), len(parts))
        parts.insert(index, part)
        return replace(self, parts=tuple(parts))

    def without_part(self, name: str) -> "Board":
        key = name.upper()
        return replace(self, parts=tuple(p for p in self.parts if p.name != key))

    def only(self, *names: str) -> "Board":
        """A board holding just the named parts (the isolated view)."""
        keys = {n.upper() for n in names}
        return replace(self, parts=tuple(p for p in self.parts if p.name in keys))

    def lifted(self, name: str, pin: int) -> "Board":
        """A copy with pin ``pin`` (1-based) of part ``name`` off its net.

        The lifted pin moves to a net of its own, ``"<PART>.PIN<n>~LIFTED"``.
        """
        p = self.part(name)
        if not 1 <= pin <= len(p.pins):
            raise ValueError(f"{p.name} has no pin {pin}")
        pins = list(p.pins)
        pins[pin - 1] = f"{p.name}.PIN{pin}~LIFTED"
        return self.with_part(replace(p, pins=tuple(pins)))


@dataclass(frozen=True)
class Reading:
    """What an instrument shows: a kind, a primary value and extras.

    ``value`` is in SI units (ohm, F, H, or volts for a junction's forward
    voltage); ``extra`` holds secondary values such as ``esr``.

    >>> Reading("capacitor", 4.7e-6, "F", {"esr": 0.8}).extra["esr"]
    0.8
    """

    kind: str
    value: float | None = None
    unit: str | None = None
    extra: Mapping[str, object] = field(default_factory=dict)

    def __post_init__(self) -> None:
        if self.kind not in READING_KINDS:
            raise ValueError(f"unknown reading kind {self.kind!r}")
        if self.unit is None and self.value is not None:
            object.__setattr__(self, "unit", READING_UNITS[self.kind])
        object.__setattr__(self, "extra", _frozen(self.extra))

    def to_dict(self) -> dict:
        return {"kind": self.kind, "value": self.value, "unit": self.unit, "extra": dict(self.extra)}
