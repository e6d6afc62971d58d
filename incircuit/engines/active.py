"""Transistor action in the analytic engine, and where the engine stops.

Bipolar transistors: the Ebers-Moll transport model with piecewise-linear
junctions (Ebers & Moll 1954; the form SPICE's Gummel-Poon model reduces to
with ``vaf = var = ikf = ikr = inf``; Sze, *Physics of Semiconductor
Devices*, ch. 5). For an NPN:

    I_be = Is/BF (exp(Vbe / (NF Vt)) - 1)      base-emitter junction, Is/BF
    I_bc = Is/BR (exp(Vbc / (NR Vt)) - 1)      base-collector junction, Is/BR
    Ict  = BF I_be - BR I_bc                   transport current, C -> E

so ``Ib = I_be + I_bc`` and ``Ic = Ict - I_bc``. Each junction is the usual
chord chain (:mod:`.pwl`) and the transport current is two current sources
controlled by the junctions' chord currents: on every segment
``I = g V + i0`` is linear in the node voltages, so each source is a
voltage-controlled current source ``gain * (g V + i0)`` and the network stays
linear between events. Forward-active (``Ic = BF Ib``), saturation (the
base-collector junction on: ``Ic`` falls below ``BF Ib`` as ``Vce`` drops to
a few tenths of a volt), reverse-active (``Ie = BR Ib``) and cut-off are
simply the segment states of the two junctions; no extra state is needed.
A PNP is the mirror image (junction anodes at emitter and collector,
transport current E -> C). ``rb``, ``re`` and ``rc`` are resistors to
internal base, emitter and collector nodes (``"Q1~B"`` ...), as in SPICE.
So the analytic engine reads ``hFE = BF`` exactly in the forward-active
region. Left out (the ngspice engine has them): the Early effect (``vaf``,
``var``: ``hFE`` grows by about ``Vcb / VAF``), high injection (``ikf``,
``ikr``), base leakage (``ise``, ``ne``, ``isc``, ``nc``: lowers ``hFE`` at
small currents; the chords below 1 uA are a decade apart, too coarse for
it), transit times, and the bias dependence of ``rb``.

MOSFET and JFET channels are *not* modelled by the analytic engine (their
junctions and gate capacitances are, see :mod:`.branches`): an enhancement
channel is taken as off, a JFET or depletion channel too.
:func:`channel_checks` lists every channel of a board with the gate-source
voltage at which that assumption fails, and :func:`broken_channels` tests
an identification run against them (at the end of every step), so that a
run that needed a channel is answered with "needs the ngspice engine"
instead of a wrong reading.

>>> from incircuit.circuit import Element
>>> from incircuit.engines.branches import Branches
>>> from incircuit.model import Model
>>> br = Branches()
>>> bjt_branches(br, Element("Q1", "Q", ("C", "B", "E"), model=Model("QX", "NPN", {"bf": 150})))
>>> [(a, k) for _, a, k, _ in br.junctions], br.controlled
([('B', 'E'), ('B', 'C')], [('C', 'E', 'Q1.BE', 150.0), ('E', 'C', 'Q1.BC', 1.0)])
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Iterable, Mapping

from ..circuit import Circuit, Element, elements
from ..model import Board
from .pwl import junction_curve

__all__ = [
    "bjt_branches",
    "ChannelCheck",
    "channel_checks",
    "broken_channels",
    "CHANNEL_MARGIN",
    "DEFAULT_VTO",
]

#: SPICE defaults of the bipolar model (ngspice manual, BJT model parameters).
_BJT_DEFAULTS = {"is": 1e-16, "bf": 100.0, "br": 1.0, "nf": 1.0, "nr": 1.0}
#: Threshold / pinch-off defaults (ngspice manual: MOSFET level 1 vto = 0, JFET vto = -2 V).
DEFAULT_VTO = {"M": 0.0, "J": -2.0}
#: The channel-off assumption counts as broken when the gate-source voltage
#: comes within this much of the threshold (V): the square-law current at
#: ``Vt - 0.1 V`` is zero, but weak inversion starts a few ``n Vt`` below it.
CHANNEL_MARGIN = 0.1


def _p(params: Mapping[str, object], key: str, default: float) -> float:
    value = params.get(key)
    return default if value is None else float(value)  # type: ignore[arg-type]


def bjt_branches(br, e: Element) -> None:
    """Add the junctions, capacitances and transport sources of bipolar ``e``
    to ``br`` (a :class:`incircuit.engines.branches.Branches`)."""
    mp: Mapping[str, float] = e.model.params if e.model is not None else {}
    pnp = e.model is not None and e.model.type.upper() == "PNP"
    c, b, em = e.nodes[:3]
    area = _p(e.params, "area", 1.0)
    d = _BJT_DEFAULTS
    is_ = _p(mp, "is", d["is"]) * area
    bf, brev = _p(mp, "bf", d["bf"]), _p(mp, "br", d["br"])
    if not (bf > 0 and brev > 0):
        raise ValueError(f"bf={bf} and br={brev} must be positive")
    # series resistances as resistors to internal nodes, as SPICE places them
    for pin, key in ((1, "rb"), (2, "re"), (0, "rc")):
        ohms = _p(mp, key, 0.0) / area
        if ohms > 0:
            inner = f"{e.name}~{'CBE'[pin]}"
            br.resistors.append((e.nodes[pin], inner, 1.0 / ohms))
            if pin == 1:
                b = inner
            elif pin == 2:
                em = inner
            else:
                c = inner
    be = junction_curve(is_ / bf, _p(mp, "nf", d["nf"]))
    bc = junction_curve(is_ / brev, _p(mp, "nr", d["nr"]))
    # (anode, cathode) of each junction; the transport source runs (from, to)
    be_pins, bc_pins = ((em, b), (c, b)) if pnp else ((b, em), (b, c))
    fwd, rev = ((em, c), (c, em)) if pnp else ((c, em), (em, c))
    name_be, name_bc = e.name + ".BE", e.name + ".BC"
    br.junctions.append((name_be, *be_pins, be))
    br.junctions.append((name_bc, *bc_pins, bc))
    for pins, key in ((be_pins, "cje"), (bc_pins, "cjc")):
        cap = _p(mp, key, 0.0) * area
        if cap > 0:
            br.capacitors.append((*pins, cap))
    br.controlled.append((*fwd, name_be, bf))
    br.controlled.append((*rev, name_bc, brev))


# -- where the analytic engine stops --------------------------------------------


@dataclass(frozen=True)
class ChannelCheck:
    """A MOSFET or JFET channel the analytic engine leaves out.

    The channel is off while ``sign * (V(gate) - V(source)) < limit``; for
    a JFET or a depletion MOSFET (``limit < 0``) it conducts even with no
    gate bias. A channel matters only with a voltage across it: the check
    fails when the channel would be on and drain and source are more than
    :data:`CHANNEL_MARGIN` apart.
    """

    part: str
    gate: str
    source: str
    drain: str
    sign: float
    limit: float

    @property
    def normally_on(self) -> bool:
        return self.limit < 0.0

    def broken(self, nets: Mapping[str, float]) -> str | None:
        """Why the channel would conduct at these net voltages, or None."""
        if self.gate not in nets or self.source not in nets:
            return None
        vgs = self.sign * (float(nets[self.gate]) - float(nets[self.source]))
        vds = float(nets.get(self.drain, nets[self.source])) - float(nets[self.source])
        if self.normally_on:
            if vgs > self.limit and abs(vds) > CHANNEL_MARGIN:
                return f"{self.part} conducts with no gate bias (a JFET or depletion channel)"
            return None
        if vgs > self.limit and abs(vds) > CHANNEL_MARGIN:
            return f"{self.part}'s gate reaches {vgs:+.2f} V, past its threshold, with {abs(vds):.2f} V across the channel"
        return None


def _vto(e: Element) -> float:
    mp: Mapping[str, float] = e.model.params if e.model is not None else {}
    return _p(mp, "vto", _p(mp, "vt0", DEFAULT_VTO[e.kind]))


def channel_checks(source: Board | Circuit | Iterable[Element]) -> tuple[ChannelCheck, ...]:
    """Every MOSFET and JFET channel of a board (or of its elements).

    For an N channel ``sign = +1`` and the channel is taken as off while
    ``Vgs < vto - CHANNEL_MARGIN`` (at least ``CHANNEL_MARGIN``); ``vto``
    below zero (a JFET, a depletion MOSFET) makes it normally on. A P
    channel mirrors it (``sign = -1``; SPICE writes an enhancement PMOS
    with a negative ``vto``, and a JFET's pinch-off ``vto`` is negative for
    both channel types: ngspice manual, MOSFET and JFET models).
    """
    if isinstance(source, Board):
        source = elements(source)
    items = source.elements if isinstance(source, Circuit) else tuple(source)
    out = []
    for e in items:
        if e.kind not in ("M", "J") or len(e.nodes) < 3:
            continue
        mtype = (e.model.type if e.model is not None else "").upper()
        p_channel = mtype in ("PMOS", "PJF")
        sign = -1.0 if p_channel else 1.0
        vto = _vto(e)
        threshold = -vto if p_channel else vto
        if e.kind == "J":
            threshold = -abs(vto)  # pinch-off: on at zero gate bias
        d, g, s = e.nodes[:3]
        limit = threshold if threshold < 0 else max(threshold - CHANNEL_MARGIN, CHANNEL_MARGIN)
        out.append(ChannelCheck(e.part or e.name, g, s, d, sign, limit))
    return tuple(out)


def broken_channels(checks: Iterable[ChannelCheck], steps: Iterable) -> list[str]:
    """Reasons why a run's steps needed a channel (empty: the run holds).

    ``steps`` are :class:`incircuit.tester.bench.StepRecord`-like objects
    with ``result.nets`` (every net's voltage at the end of the step).
    """
    found: dict[str, str] = {}
    checks = tuple(checks)
    for step in steps:
        nets = step.result.nets
        for check in checks:
            if check.part in found:
                continue
            why = check.broken(nets)
            if why is not None:
                found[check.part] = why
    return list(found.values())
