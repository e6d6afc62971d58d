"""What the path search returns: plain frozen dataclasses a reader (the
judge, the show command) turns into words and JSON."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ..model import Tolerance
from ..units import format_value

__all__ = ["PATH_KINDS", "Link", "Path", "Between", "Surroundings"]

#: Path kinds in reporting order.
PATH_KINDS = ("resistive", "capacitive", "inductive", "mixed", "junction", "chip")

_UNITS = {"R": "ohm", "C": "F", "L": "H"}


@dataclass(frozen=True)
class Link:
    """One part on a path, crossed from ``nets[0]`` to ``nets[1]``.

    ``via`` names the pins crossed in that order (``("1", "2")`` for R/C/L,
    ``("A", "K")`` for a diode, ``("B", "E")`` for a transistor junction).
    ``nature`` is R, C, L, junction, gate (insulated MOSFET gate: a
    capacitance) or chip. ``forward`` is True when a junction conducts in the
    direction of travel, False when it blocks it, None when it has no single
    direction (a resistor, a chip pin, a transistor's C-E).
    """

    part: str
    kind: str
    via: tuple[str, str]
    nets: tuple[str, str]
    nature: str
    value: float | None = None
    model: str | None = None
    tolerance: Tolerance | None = None
    forward: bool | None = None
    #: An inductor's winding resistance (ohm) when the netlist gives one.
    dcr: float | None = None

    @property
    def unit(self) -> str | None:
        return "ohm" if self.nature == "R" else _UNITS.get(self.kind)

    def label(self) -> str:
        """``"R14 (4.7 kohm)"``, ``"D3 (DSIG, K->A)"``, ``"U1 (pins 2-4)"``."""
        if self.kind in _UNITS and self.value is not None:
            return f"{self.part} ({format_value(self.value, self.unit)})"
        if self.kind == "X" and self.nature == "R":
            return f"{self.part} (short, {format_value(self.value or 0.0, 'ohm')})"
        if self.kind == "X":
            return f"{self.part} (pins {self.via[0]}-{self.via[1]})"
        model = f"{self.model}, " if self.model else ""
        return f"{self.part} ({model}{self.via[0]}->{self.via[1]})"


@dataclass(frozen=True)
class Path:
    """One path between two nets through the rest of the board.

    kind
        One of :data:`PATH_KINDS`: resistive (only R), capacitive (only C
        or a MOSFET gate), inductive (only L), mixed (R, C and L mixed),
        junction (through a diode or a transistor junction), chip (through a
        pin of an unmodelled X part; takes precedence over junction). An
        unmodelled part whose pin roles make it a short (fuse, bead, link,
        closed switch) counts as a resistor; one that is open (connector,
        crystal, open switch) and pins with role open or no-connect join
        nothing.
    parts
        Part names in order from ``nets[0]`` to ``nets[-1]``.
    nets
        The nets visited, one more than ``parts``.
    dc_resistance
        Series sum of resistances (inductors count as their ``dcr``, or
        0 ohm) for paths without capacitor, junction or chip; else None.
    links
        Per part: pins crossed, value, tolerance, model, direction.
    """

    kind: str
    parts: tuple[str, ...]
    nets: tuple[str, ...]
    dc_resistance: float | None
    links: tuple[Link, ...] = ()

    @property
    def capacitance(self) -> float | None:
        """Series capacitance of a path of capacitors only (1/C = sum 1/Ci)."""
        if self.kind != "capacitive" or any(k.kind != "C" or not k.value for k in self.links):
            return None
        return 1.0 / sum(1.0 / float(k.value) for k in self.links)  # type: ignore[arg-type]

    @property
    def inductance(self) -> float | None:
        """Series inductance of a path of inductors only."""
        if self.kind != "inductive" or any(k.value is None for k in self.links):
            return None
        return float(sum(float(k.value) for k in self.links))  # type: ignore[arg-type]

    @property
    def blocks_dc(self) -> bool:
        """True when a capacitor or a MOSFET gate on the path stops DC (it
        still passes current while it charges)."""
        return any(k.nature in ("C", "gate") for k in self.links)

    @property
    def conducts(self) -> str:
        """Which way the path's junctions let current through below their
        breakdown: ``"both"`` (no junction with a direction), ``"forward"``
        (from ``nets[0]`` to ``nets[-1]``), ``"reverse"``, or ``"neither"``
        (junctions facing each other). Capacitors are ignored here (see
        :attr:`blocks_dc`): a probe charges a capacitor through a diode
        in the diode's forward direction only."""
        flags = {k.forward for k in self.links if k.forward is not None}
        if not flags:
            return "both"
        if flags == {True}:
            return "forward"
        if flags == {False}:
            return "reverse"
        return "neither"

    def describe(self) -> str:
        """Plain words, e.g. ``"R14 (4.7 kohm) and R15 (10 kohm) in series: 14.7 kohm"``."""
        labels = [k.label() for k in self.links] or list(self.parts)
        text = labels[0] if len(labels) == 1 else ", ".join(labels[:-1]) + " and " + labels[-1]
        if len(labels) > 1:
            text += " in series"
        if self.dc_resistance is not None and len(labels) > 1:
            text += f": {format_value(self.dc_resistance, 'ohm')}"
        elif self.capacitance is not None and len(labels) > 1:
            text += f": {format_value(self.capacitance, 'F')}"
        return text

    def to_dict(self) -> dict:
        return {
            "kind": self.kind,
            "parts": list(self.parts),
            "nets": list(self.nets),
            "dc_resistance": self.dc_resistance,
            "capacitance": self.capacitance,
            "conducts": self.conducts,
            "blocks_dc": self.blocks_dc,
            "links": [
                {"part": k.part, "kind": k.kind, "via": list(k.via), "nets": list(k.nets),
                 "nature": k.nature, "value": k.value, "unit": k.unit, "model": k.model,
                 "forward": k.forward}
                for k in self.links
            ],
        }


@dataclass(frozen=True)
class Between:
    """Everything else that joins ``nets[0]`` and ``nets[1]``.

    ``pins`` names the pins of the part the pair belongs to (empty for a
    plain pair of nets). ``equivalent_resistance`` is the DC resistance of
    the resistors and inductors of the rest of the board (inf when they do
    not connect the nets). ``tied`` says the two nets are one tied group.
    ``cut`` names the kinds whose list reached :data:`MAX_PATHS` (or the
    search step limit): more paths of that kind exist than are listed.
    Paths longer than :data:`MAX_PATH_PARTS` are never listed (their
    resistors still count in ``equivalent_resistance``).
    """

    nets: tuple[str, str]
    paths: tuple[Path, ...]
    cut: tuple[str, ...]
    equivalent_resistance: float
    tied: bool = False
    pins: tuple[str, ...] = ()
    without: tuple[str, ...] = ()

    @property
    def truncated(self) -> bool:
        """True when some kind's list was cut."""
        return bool(self.cut)

    def by_kind(self) -> dict[str, tuple[Path, ...]]:
        """Paths grouped by kind, in :data:`PATH_KINDS` order (kinds present only)."""
        groups = {k: tuple(p for p in self.paths if p.kind == k) for k in PATH_KINDS}
        return {k: v for k, v in groups.items() if v}

    def to_dict(self) -> dict:
        return {
            "nets": list(self.nets),
            "pins": list(self.pins),
            "tied": self.tied,
            "equivalent_resistance": _json_float(self.equivalent_resistance),
            "cut": list(self.cut),
            "paths": {k: [p.to_dict() for p in v] for k, v in self.by_kind().items()},
        }


@dataclass(frozen=True)
class Surroundings:
    """The rest of the board around one part, per pair of its pins.

    For a two-pin part ``pairs`` has one entry and :attr:`paths`,
    :attr:`equivalent_resistance` and :attr:`truncated` read it directly.
    ``tied`` lists the tied groups that touch the part's nets.
    """

    part: str
    kind: str
    nets: tuple[str, ...]
    pairs: tuple[Between, ...]
    tied: tuple[frozenset[str], ...] = field(default_factory=tuple)

    def _single(self) -> Between:
        if len(self.pairs) != 1:
            raise ValueError(f"{self.part} has {len(self.pairs)} pin pairs; use .pairs or .pair()")
        return self.pairs[0]

    @property
    def paths(self) -> tuple[Path, ...]:
        return self._single().paths

    @property
    def equivalent_resistance(self) -> float:
        return self._single().equivalent_resistance

    @property
    def truncated(self) -> bool:
        return self._single().truncated

    def pair(self, a: str, b: str) -> Between:
        """The entry for pins ``a`` and ``b`` (roles such as "B", "E"), either order."""
        for entry in self.pairs:
            if set(entry.pins) == {a.upper(), b.upper()}:
                return entry
        raise KeyError(f"{self.part} has no pin pair {a}-{b}")


def _json_float(x: float) -> float | None:
    return x if math.isfinite(x) else None
