"""The board as primitive circuit elements, the common input of every engine.

A Board's parts are mostly primitives already (the importer flattens
subcircuits). This module adds what the parts imply electrically:

* a capacitor's ``esr`` annotation becomes a series resistor through an
  internal net ``"<part>~ESR"``; an inductor's ``dcr`` likewise (``"~DCR"``);
* ``.model`` cards are resolved and attached to the elements that use them;
* ``K`` parts become :class:`Coupling` records between two inductors;
* an unmodelled part (X without a subcircuit) contributes what its pin
  roles imply (see ``incircuit.chips``); with no roles known its pins are
  open.

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("C1", "C", ("A", "B"), 1e-6, params={"esr": 0.5}),))
>>> [(e.name, e.kind, e.nodes) for e in elements(b).elements]
[('C1', 'C', ('A', 'C1~ESR')), ('C1~ESR', 'R', ('C1~ESR', 'B'))]
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Mapping

from .model import Board, Model, Part

__all__ = ["Element", "Coupling", "Circuit", "elements", "UNMODELLED_EXPANDERS"]


@dataclass(frozen=True)
class Element:
    """One primitive: R, C, L (value in ohm/F/H), D, Q, M, J (with model)."""

    name: str
    kind: str
    nodes: tuple[str, ...]
    value: float | None = None
    model: Model | None = None
    params: Mapping[str, object] = field(default_factory=dict)
    #: The board part this element belongs to.
    part: str = ""


@dataclass(frozen=True)
class Coupling:
    """Mutual coupling ``k`` between two inductor elements."""

    name: str
    inductors: tuple[str, str]
    k: float


@dataclass(frozen=True)
class Circuit:
    elements: tuple[Element, ...]
    couplings: tuple[Coupling, ...] = ()

    @property
    def nets(self) -> tuple[str, ...]:
        return tuple(sorted({n for e in self.elements for n in e.nodes}))


#: Functions that turn an unmodelled part into elements, tried in order;
#: the first that returns a tuple wins. ``incircuit.chips`` registers the
#: pin-role model here. With none matching, the part's pins are open.
UNMODELLED_EXPANDERS: list[Callable[[Part, Board], tuple[Element, ...] | None]] = []


def _register_pin_roles() -> None:
    """Register the pin-role model of ``incircuit.chips`` (a higher layer,
    so it is loaded on first use, never when this module is imported)."""
    from .chips.pinmodels import register

    register()


def _series_split(part: Part, kind: str, key: str, suffix: str) -> tuple[Element, ...]:
    """The part plus an optional series resistor given by ``params[key]``."""
    extra = part.params.get(key)
    if not extra:
        return (Element(part.name, kind, part.pins, part.value, params=part.params, part=part.name),)
    inner = f"{part.name}~{suffix}"
    return (
        Element(part.name, kind, (part.pins[0], inner), part.value, params=part.params, part=part.name),
        Element(inner, "R", (inner, part.pins[1]), float(extra), part=part.name),
    )


def _expand(part: Part, board: Board) -> tuple[Element, ...]:
    if part.kind == "R":
        return (Element(part.name, "R", part.pins, part.value, params=part.params, part=part.name),)
    if part.kind == "C":
        return _series_split(part, "C", "esr", "ESR")
    if part.kind == "L":
        return _series_split(part, "L", "dcr", "DCR")
    if part.kind in ("D", "Q", "M", "J"):
        model = board.models.get(part.model or "")
        return (Element(part.name, part.kind, part.pins, part.value, model, part.params, part.name),)
    if part.kind == "X":
        _register_pin_roles()
        for expander in UNMODELLED_EXPANDERS:
            found = expander(part, board)
            if found is not None:
                return found
        return ()
    return ()  # K is handled as a coupling


def elements(board: Board) -> Circuit:
    """The board's primitive elements and inductor couplings."""
    out: list[Element] = []
    couplings: list[Coupling] = []
    for part in board.parts:
        if part.kind == "K":
            a, b = part.params["inductors"]  # type: ignore[misc]
            couplings.append(Coupling(part.name, (str(a), str(b)), float(part.value or 0.0)))
        else:
            out.extend(_expand(part, board))
    names = {e.name for e in out if e.kind == "L"}
    couplings = [c for c in couplings if set(c.inductors) <= names]
    return Circuit(tuple(out), tuple(couplings))
