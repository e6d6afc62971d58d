"""The p-n junctions and zero-bias channels hidden in a board's elements.

Bench instruments and the judge both ask the same questions of every
semiconductor: where are its junctions, which way do they conduct, at what
voltage do they turn on, and does a channel conduct with no gate bias.
This module answers them from :mod:`incircuit.circuit` elements and their
``.model`` cards, using SPICE default parameters where a card is silent
(ngspice user manual, device chapters).

* D: one junction, anode (pin 1) to cathode (pin 2).
* Q: base-emitter and base-collector junctions (NPN anode at the base,
  PNP cathode at the base); no transistor action is modelled here.
* M: the body diodes bulk-drain and bulk-source (NMOS anode at the bulk);
  a depletion device's channel conducts at zero gate bias with
  ``gds = KP * W/L * |VTO|`` (level-1 linear region, Vds -> 0).
* J: gate-drain and gate-source junctions (N-channel anode at the gate);
  the channel conducts at zero gate bias with ``gds = 2 * BETA * |VTO|``.

A junction "turns on" at the voltage where its Shockley current
``Is * (exp(V / (n Vt)) - 1)`` reaches a given current (Sze, *Physics of
Semiconductor Devices*, diode equation).

>>> from incircuit.model import Board, Part, Model
>>> b = Board("t", (Part("D1", "D", ("A", "K"), model="DX"),), {"DX": Model("DX", "D", {"is": 1e-14})})
>>> j, = junctions(elements(b))
>>> (j.name, j.anode, j.cathode, round(j.turn_on(1e-3), 3))
('D1', 'A', 'K', 0.655)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..circuit import Circuit, Element, elements

__all__ = ["Junction", "Channel", "junctions", "channels", "THERMAL_VOLTAGE", "elements"]

#: kT/q at the SPICE nominal temperature of 27 degC (ngspice manual, TNOM).
THERMAL_VOLTAGE = 1.380649e-23 * 300.15 / 1.602176634e-19

# SPICE defaults (ngspice user manual: diode, BJT, MOSFET level 1, JFET models)
_DIODE_IS = 1e-14
_BJT_IS = 1e-16
_MOS_IS = 1e-14
_MOS_KP = 2e-5
_JFET_IS = 1e-14
_JFET_BETA = 1e-4
_JFET_VTO = -2.0


@dataclass(frozen=True)
class Junction:
    """One p-n junction: ``anode`` -> ``cathode`` with Shockley parameters."""

    name: str
    part: str
    anode: str
    cathode: str
    saturation: float
    emission: float = 1.0
    capacitance: float = 0.0

    @property
    def n_vt(self) -> float:
        return self.emission * THERMAL_VOLTAGE

    def current(self, volts: float) -> float:
        """Shockley current at forward voltage ``volts`` (A)."""
        return self.saturation * math.expm1(min(volts / self.n_vt, 80.0))

    def conductance(self) -> float:
        """Small-signal conductance at zero bias, ``Is / (n Vt)`` (S)."""
        return self.saturation / self.n_vt

    def turn_on(self, current: float) -> float:
        """Forward voltage at which the junction carries ``current`` (V)."""
        return self.n_vt * math.log1p(current / self.saturation)


@dataclass(frozen=True)
class Channel:
    """A channel that conducts at zero gate bias (depletion FET, JFET)."""

    name: str
    part: str
    drain: str
    source: str
    conductance: float


def _p(e: Element, key: str, default: float) -> float:
    if e.model is not None and key in e.model.params:
        return float(e.model.params[key])
    return default


def _area(e: Element) -> float:
    try:
        return float(e.params.get("area", 1.0))  # type: ignore[arg-type]
    except (TypeError, ValueError):
        return 1.0


def _element_junctions(e: Element) -> list[Junction]:
    area = _area(e)
    mtype = (e.model.type if e.model is not None else "").upper()
    out: list[Junction] = []
    if e.kind == "D":
        out.append(Junction(e.name, e.part, e.nodes[0], e.nodes[1], _p(e, "is", _DIODE_IS) * area,
                            _p(e, "n", 1.0), _p(e, "cjo", _p(e, "cj0", 0.0)) * area))
    elif e.kind == "Q" and len(e.nodes) >= 3:
        c, b, em = e.nodes[:3]
        is_ = _p(e, "is", _BJT_IS) * area
        pairs = [("B-E", em, _p(e, "nf", 1.0), _p(e, "cje", 0.0)),
                 ("B-C", c, _p(e, "nr", 1.0), _p(e, "cjc", 0.0))]
        for label, other, n, cj in pairs:
            a, k = (b, other) if mtype != "PNP" else (other, b)
            out.append(Junction(f"{e.name} {label}", e.part, a, k, is_, n, cj * area))
    elif e.kind == "M" and len(e.nodes) >= 4:
        d, _g, s, bulk = e.nodes[:4]
        is_ = _p(e, "is", _MOS_IS)
        n = _p(e, "n", 1.0)
        for label, other, cap in (("body B-D", d, "cbd"), ("body B-S", s, "cbs")):
            a, k = (bulk, other) if mtype != "PMOS" else (other, bulk)
            out.append(Junction(f"{e.name} {label}", e.part, a, k, is_, n, _p(e, cap, 0.0)))
    elif e.kind == "J" and len(e.nodes) >= 3:
        d, g, s = e.nodes[:3]
        is_ = _p(e, "is", _JFET_IS) * area
        n = _p(e, "n", 1.0)
        for label, other, cap in (("G-D", d, "cgd"), ("G-S", s, "cgs")):
            a, k = (g, other) if mtype != "PJF" else (other, g)
            out.append(Junction(f"{e.name} {label}", e.part, a, k, is_, n, _p(e, cap, 0.0) * area))
    return [j for j in out if j.anode != j.cathode]


def junctions(circuit: Circuit) -> tuple[Junction, ...]:
    """Every junction of the circuit's semiconductors, in element order."""
    return tuple(j for e in circuit.elements for j in _element_junctions(e))


def _float_param(e: Element, key: str, default: float) -> float:
    try:
        return float(e.params.get(key, default))  # type: ignore[arg-type]
    except (TypeError, ValueError):
        return default


def channels(circuit: Circuit) -> tuple[Channel, ...]:
    """Channels that conduct with zero gate-source voltage."""
    out: list[Channel] = []
    for e in circuit.elements:
        mtype = (e.model.type if e.model is not None else "").upper()
        if e.kind == "M" and len(e.nodes) >= 4:
            vto = _p(e, "vto", 0.0)
            depletion = vto < 0 if mtype != "PMOS" else vto > 0
            if depletion:
                w = _float_param(e, "w", 100e-6)
                length = _float_param(e, "l", 100e-6)
                g = _p(e, "kp", _MOS_KP) * (w / length if length > 0 else 1.0) * abs(vto)
                out.append(Channel(f"{e.name} channel", e.part, e.nodes[0], e.nodes[2], g))
        elif e.kind == "J" and len(e.nodes) >= 3:
            g = 2.0 * _p(e, "beta", _JFET_BETA) * _area(e) * abs(_p(e, "vto", _JFET_VTO))
            out.append(Channel(f"{e.name} channel", e.part, e.nodes[0], e.nodes[2], g))
    return tuple(c for c in out if c.drain != c.source and c.conductance > 0)
