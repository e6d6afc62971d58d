"""A board's primitive elements as two-terminal branches for nodal analysis.

R, C and L map directly (a 0 ohm resistor or a 0 H inductor is a tie that
merges its nets). Semiconductors become their junctions, each a
piecewise-linear diode (:mod:`.pwl`), plus their zero-bias capacitances as
fixed linear capacitors:

* D: anode-cathode junction from the model's is, n, rs, bv, ibv (times
  ``area``); ``cjo`` across it.
* Q (C B E): the Ebers-Moll transport model of :mod:`.active`: base-emitter
  and base-collector junctions from is/bf, nf and is/br, nr (NPN: anodes at
  the base; PNP reversed), series resistance ``rb + re`` and ``rb + rc``,
  cje and cjc across them, and the transport current as two current
  sources controlled by the junction currents (:attr:`Branches.controlled`).
* M (D G S B): bulk-drain and bulk-source junctions from is (NMOS: anodes at
  the bulk; PMOS reversed), so with bulk tied to source the body diode runs
  source to drain; cbd, cbs across them; gate capacitances ``cgso*w`` and
  ``cgdo*w`` when given (``w`` from the instance, else 100 um, the SPICE
  default), otherwise the gate is open.
* J (D G S): gate-drain and gate-source junctions from is, n (N channel:
  anodes at the gate; P reversed); cgd, cgs across them.

Parts without a model use SPICE's defaults (Q: NPN, M: NMOS, J: N channel).

>>> from incircuit.circuit import Element
>>> br = to_branches([Element("R1", "R", ("A", "B"), 0.0), Element("C1", "C", ("B", "C"), 1e-9)])
>>> br.ties, br.capacitors
([('A', 'B')], [('B', 'C', 1e-09)])
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Iterable, Mapping

from ..circuit import Circuit, Element
from ..errors import EngineError
from .active import bjt_branches
from .pwl import Curve, junction_curve

__all__ = ["Branches", "to_branches", "from_circuit"]

#: Coupling coefficients are kept inside this bound: |k| = 1 makes the
#: inductance matrix singular (no state-space form with both winding currents).
K_MAX = 1.0 - 1e-6
#: SPICE's default MOSFET channel width (m) for overlap capacitances per width.
DEFAULT_W = 100e-6


@dataclass
class Branches:
    """Two-terminal branches: resistors hold conductances (S)."""

    resistors: list[tuple[str, str, float]] = field(default_factory=list)
    capacitors: list[tuple[str, str, float]] = field(default_factory=list)
    inductors: list[tuple[str, str, str, float]] = field(default_factory=list)
    couplings: list[tuple[str, str, float]] = field(default_factory=list)
    junctions: list[tuple[str, str, str, Curve]] = field(default_factory=list)
    ties: list[tuple[str, str]] = field(default_factory=list)
    #: Current sources ``(from, to, junction name, gain)``: ``gain`` times the
    #: named junction's current flows from net ``from`` to net ``to``.
    controlled: list[tuple[str, str, str, float]] = field(default_factory=list)

    def nets(self) -> tuple[str, ...]:
        found: set[str] = set()
        for group in (self.resistors, self.capacitors, self.ties):
            for a, b, *_ in group:
                found.update((a, b))
        for group2 in (self.inductors, self.junctions):
            for _, a, b, _ in group2:
                found.update((a, b))
        return tuple(sorted(found))


def _value(e: Element) -> float:
    if e.value is None or not math.isfinite(e.value) or e.value < 0:
        raise EngineError(f"{e.name} has no usable value ({e.value})", "give the part a value in the netlist")
    return float(e.value)


def _p(params: Mapping[str, object], key: str, default: float) -> float:
    value = params.get(key)
    return default if value is None else float(value)  # type: ignore[arg-type]


def _junction(br: Branches, name: str, anode: str, cathode: str, curve: Curve, cap: float) -> None:
    br.junctions.append((name, anode, cathode, curve))
    if cap > 0:
        br.capacitors.append((anode, cathode, cap))


def _semiconductor(br: Branches, e: Element) -> None:
    mp: Mapping[str, float] = e.model.params if e.model is not None else {}
    mtype = (e.model.type if e.model is not None else "").upper()
    area = _p(e.params, "area", 1.0)
    is_ = _p(mp, "is", 1e-14) * area
    if e.kind == "D":
        a, k = e.nodes[:2]
        curve = junction_curve(is_, _p(mp, "n", 1.0), _p(mp, "rs", 0.0) / area, _p(mp, "bv", math.inf), _p(mp, "ibv", 1e-3) * area)
        _junction(br, e.name, a, k, curve, _p(mp, "cjo", _p(mp, "cj0", 0.0)) * area)
    elif e.kind == "Q":
        bjt_branches(br, e)
    elif e.kind == "M":
        d, g, s = e.nodes[:3]
        bulk = e.nodes[3] if len(e.nodes) > 3 else s
        curve = junction_curve(is_, 1.0, 0.0)
        pmos = mtype == "PMOS"
        _junction(br, e.name + ".BD", *((d, bulk) if pmos else (bulk, d)), curve, _p(mp, "cbd", 0.0))
        _junction(br, e.name + ".BS", *((s, bulk) if pmos else (bulk, s)), curve, _p(mp, "cbs", 0.0))
        w = _p(e.params, "w", DEFAULT_W)
        for pin, key in ((s, "cgso"), (d, "cgdo")):
            cap = _p(mp, key, 0.0) * w
            if cap > 0:
                br.capacitors.append((g, pin, cap))
    elif e.kind == "J":
        d, g, s = e.nodes[:3]
        curve = junction_curve(is_, _p(mp, "n", 1.0), 0.0)
        pjf = mtype == "PJF"
        _junction(br, e.name + ".GD", *((d, g) if pjf else (g, d)), curve, _p(mp, "cgd", 0.0) * area)
        _junction(br, e.name + ".GS", *((s, g) if pjf else (g, s)), curve, _p(mp, "cgs", 0.0) * area)


def to_branches(elements: Iterable[Element], couplings: Iterable = ()) -> Branches:
    """Branches of ``elements``; ``couplings`` are :class:`incircuit.circuit.Coupling`."""
    br = Branches()
    for e in elements:
        a, b = e.nodes[0], e.nodes[1] if len(e.nodes) > 1 else e.nodes[0]
        if e.kind == "R":
            r = _value(e)
            if r == 0.0:
                br.ties.append((a, b))
            else:
                br.resistors.append((a, b, 1.0 / r))
        elif e.kind == "C":
            c = _value(e)
            if c > 0:
                br.capacitors.append((a, b, c))
        elif e.kind == "L":
            h = _value(e)
            if h == 0.0:
                br.ties.append((a, b))
            else:
                br.inductors.append((e.name, a, b, h))
        elif e.kind in ("D", "Q", "M", "J"):
            try:
                _semiconductor(br, e)
            except ValueError as exc:
                raise EngineError(f"{e.name}: {exc}", "check the .model parameters") from None
    for cp in couplings:
        k = max(-K_MAX, min(K_MAX, float(cp.k)))
        br.couplings.append((cp.inductors[0], cp.inductors[1], k))
    return br


def from_circuit(circuit: Circuit) -> Branches:
    """Branches of a :class:`incircuit.circuit.Circuit`."""
    return to_branches(circuit.elements, circuit.couplings)
