"""A Board with probes attached, written as a sanitised ngspice deck.

The deck is built from the parsed data model only (:func:`incircuit.circuit.elements`);
no text a user wrote reaches ngspice. Every name is replaced by a generated
identifier (nets ``n1 n2 ...``, elements ``r1 c1 d1 ...``, models
``mdl1 ...``), model parameter names must be plain identifiers and every
number is written by Python's ``repr`` of a finite float. The maps back to
board names are kept for results and error messages.

What the deck adds to the board (see ``docs/engines.md``, "ngspice engine"):

* the tester's ground is ngspice's node ``0``; the board's own net ``"0"``
  is an ordinary floating net like any other and gets a generated name;
* every net has :data:`LEAK` ohms to the tester's ground (like SPICE's
  gmin) so that the matrix of a floating board is never singular;
* every island of the board (nets joined by parts) that holds capacitors,
  junctions or a probe, but no probe with stray capacitance, gets a small
  capacitance to ground on one net (a probe net if it has one): 1 fF or
  1e-9 of the island's capacitors, whichever is larger. Without it the
  island's common-mode voltage hangs on the leaks alone and a short step
  with a large capacitor is numerically singular;
* 0-ohm resistors, 0-henry inductors and parts that carry no current
  (bridges to nowhere, see :mod:`.spice_topology`) merge their two nets;
* per probe, ``stray`` farads to ground and, while driven, a voltage source
  behind the Thevenin resistance (at least :data:`MIN_SOURCE_R`);
* a bipolar transistor with three pins has its substrate on its collector,
  a MOSFET with three pins its bulk on its source;
* the state carried from the previous step as initial conditions (``uic``).

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1;SHELL", "R", ("0", "X Y"), 1e3),))
>>> deck = build(b, ("0", "X Y"), 1e-12)
>>> deck.node_of["0"], deck.node_of["X Y"]
('n1', 'n2')
>>> print(deck.element_lines({}, {})[0])
r1 n1 n2 1000.0
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Mapping, Sequence

from ..circuit import Circuit, Element, elements
from ..errors import EngineError
from ..model import Board, Model
from .base import Drive
from .spice_topology import ISLAND_C, ISLAND_FRACTION, Nets, anchors, simplify

__all__ = ["Deck", "build", "number", "LEAK", "ISLAND_C", "ISLAND_FRACTION", "MIN_SOURCE_R", "MODEL_TYPES"]

#: Ohms from every net to the tester's ground (SPICE's gmin is 1e-12 S).
LEAK = 1e12
#: ngspice's ``tstep`` as a fraction of the largest step.
FIRST_STEP = 1e-4
#: Smallest Thevenin resistance written for a driven probe (ohm).
MIN_SOURCE_R = 1e-3

#: Board model type -> (ngspice type, element kinds that may use it).
MODEL_TYPES: Mapping[str, tuple[str, str]] = {
    "D": ("d", "D"),
    "NPN": ("npn", "Q"),
    "PNP": ("pnp", "Q"),
    "NMOS": ("nmos", "M"),
    "PMOS": ("pmos", "M"),
    "VDMOS": ("vdmos", "M"),
    "NJF": ("njf", "J"),
    "PJF": ("pjf", "J"),
}

#: Model kind when a part names no usable model: SPICE's default parameters.
_DEFAULT_TYPE = {"D": "D", "Q": "NPN", "M": "NMOS", "J": "NJF"}

#: Instance parameters passed on per element kind; everything else is ignored.
_INSTANCE_PARAMS = {
    "D": ("area", "m", "pj"),
    "Q": ("area", "areab", "areac", "m"),
    "M": ("l", "w", "ad", "as", "pd", "ps", "nrd", "nrs", "m"),
    "VDMOS": ("m",),
    "J": ("area", "m"),
}

#: Flags written without a value on a ``.model`` line.
_FLAGS = {"vdmos": ("pchan", "nchan")}

_PARAM_NAME = re.compile(r"^[a-z][a-z0-9_]{0,31}$")


def number(x: float) -> str:
    """``x`` as ngspice reads it, exactly; ValueError unless finite.

    >>> number(1e-12), number(4700.0)
    ('1e-12', '4700.0')
    """
    x = float(x)
    if not math.isfinite(x):
        raise ValueError(f"not a finite number: {x!r}")
    return repr(x)


@dataclass(frozen=True)
class _Line:
    """One element line: fixed text plus the initial condition of the step."""

    text: str
    #: "" none; "L" the inductor current of ``ident``; else the element kind,
    #: with ``ic=`` the voltage differences of the node ``pairs``.
    ic: str = ""
    pairs: tuple[tuple[str, str], ...] = ()
    ident: str = ""


@dataclass(frozen=True)
class Deck:
    """The sanitised circuit of one session; ``text`` writes one step."""

    #: Board net -> node identifier.
    node_of: Mapping[str, str]
    #: Every node identifier (never "0"), in order.
    nodes: tuple[str, ...]
    #: Node of each probe, in probe order.
    probe_nodes: tuple[str, ...]
    stray: float
    lines: tuple[_Line, ...]
    #: Inductor identifiers, whose currents are state.
    inductors: tuple[str, ...]
    #: (node, farads) on one node of each island that no probe's stray holds.
    anchors: tuple[tuple[str, float], ...]
    #: Board nets reported in results: those that parts join to a probe, and
    #: the probe nets (not the internal ESR/DCR nets).
    reported: tuple[str, ...]
    #: Element or model identifier -> what the user calls it ("D3", ".model DX of D3").
    blame: Mapping[str, str]

    # -- names back -------------------------------------------------------
    def nets_of(self, node: str) -> tuple[str, ...]:
        """The board nets merged into ``node``."""
        return tuple(n for n, k in self.node_of.items() if k == node)

    def net_volts(self, volts: Mapping[str, float]) -> dict[str, float]:
        """Node voltages as the voltages of the :attr:`reported` board nets."""
        return {net: float(volts.get(self.node_of[net], 0.0)) for net in self.reported}

    # -- one step ---------------------------------------------------------
    def element_lines(self, volts: Mapping[str, float], currents: Mapping[str, float]) -> list[str]:
        """Board element lines with initial conditions from the state."""

        def v(node: str) -> float:
            return 0.0 if node == "0" else float(volts.get(node, 0.0))

        out = []
        for line in self.lines:
            if not line.ic:
                out.append(line.text)
            elif line.ic == "L":
                out.append(f"{line.text} ic={number(currents.get(line.ident, 0.0))}")
            else:
                ic = ",".join(number(v(a) - v(b)) for a, b in line.pairs)
                out.append(f"{line.text} ic={ic}")
        return out

    def text(
        self,
        volts: Mapping[str, float],
        currents: Mapping[str, float],
        drive: Drive,
        duration: float,
        tmax: float,
        breakpoints: Sequence[float] = (),
        options: str = "",
    ) -> str:
        """The whole deck of one transient step of ``duration`` seconds."""
        if len(drive) != len(self.probe_nodes):
            raise ValueError(f"drive has {len(drive)} entries for {len(self.probe_nodes)} probes")
        out = ["* incircuit step"]
        if options:
            out.append(f".options {options}")
        out.extend(self.element_lines(volts, currents))
        for k, node in enumerate(self.probe_nodes, 1):
            if self.stray > 0:
                out.append(f"cp{k} {node} 0 {number(self.stray)} ic={number(volts.get(node, 0.0))}")
        for k, (node, source) in enumerate(zip(self.probe_nodes, drive), 1):
            if source is not None:
                out.append(f"vp{k} sp{k} 0 dc {number(source.volts)}")
                out.append(f"rp{k} sp{k} {node} {number(max(source.resistance, MIN_SOURCE_R))}")
        for k, node in enumerate(self.nodes, 1):
            out.append(f"rg{k} {node} 0 {number(LEAK)}")
        for k, (node, farads) in enumerate(self.anchors, 1):
            out.append(f"cg{k} {node} 0 {number(farads)} ic={number(volts.get(node, 0.0))}")
        points = sorted({float(t) for t in breakpoints if 0.0 < t < duration})
        if points:
            pairs = " ".join(f"{number(t)} 0" for t in points)
            out.append(f"vbk bk 0 pwl(0 0 {pairs} {number(duration)} 0)")
        ics = [f"v({node})={number(volts.get(node, 0.0))}" for node in self.nodes]
        for i in range(0, len(ics), 8):
            out.append(".ic " + " ".join(ics[i : i + 8]))
        # A small first step: ngspice starts with one backward-Euler step of
        # about tstep/100 and does not check its error.
        out.append(f".tran {number(tmax * FIRST_STEP)} {number(duration)} 0 {number(tmax)} uic")
        out.append(".end")
        return "\n".join(out) + "\n"


# -- building -----------------------------------------------------------------


def _value(e: Element, unit: str) -> float:
    if e.value is None or not math.isfinite(float(e.value)) or float(e.value) < 0:
        raise EngineError(
            f"{e.part or e.name} has no usable value ({e.value!r} {unit})",
            f"check the value of {e.part or e.name} in the netlist",
        )
    return float(e.value)


def _is_short(e: Element) -> bool:
    return e.kind in ("R", "L") and _value(e, "ohm" if e.kind == "R" else "H") == 0.0


def _model_card(ident: str, model: Model | None, kind: str, part: str) -> tuple[str, str]:
    """The sanitised ``.model`` line and the ngspice type it declares."""
    btype = model.type.upper() if model is not None else _DEFAULT_TYPE[kind]
    where = f"the .model card {model.name} of {part}" if model is not None else part
    if btype not in MODEL_TYPES or MODEL_TYPES[btype][1] != kind:
        raise EngineError(
            f"{part}: model type {btype} does not fit a {kind} part",
            f"check {where}",
        )
    stype = MODEL_TYPES[btype][0]
    words = []
    for key, value in (model.params.items() if model is not None else ()):
        key = str(key).lower()
        if not _PARAM_NAME.match(key):
            raise EngineError(f"{part}: model parameter {key!r} is not a plain name", f"check {where}")
        if key in _FLAGS.get(stype, ()):
            if value:
                words.append(key)
            continue
        try:
            words.append(f"{key}={number(value)}")  # type: ignore[arg-type]
        except (TypeError, ValueError):
            raise EngineError(f"{part}: model parameter {key}={value!r} is not a number", f"check {where}") from None
    return f".model {ident} {stype}({' '.join(words)})", stype


def _instance_words(e: Element, key: str) -> list[str]:
    words = []
    for name in _INSTANCE_PARAMS[key]:
        if name in e.params:
            try:
                words.append(f"{name}={number(e.params[name])}")  # type: ignore[arg-type]
            except (TypeError, ValueError):
                raise EngineError(
                    f"{e.part}: parameter {name}={e.params[name]!r} is not a number",
                    f"check the line of {e.part} in the netlist",
                ) from None
    return words


_PINS = {"D": 2, "Q": 3, "M": 3, "J": 3}


def _semiconductor(n: list[str], kind: str, stype: str) -> tuple[list[str], tuple]:
    """Pins as written and the node pairs of the ``ic=`` junction voltages."""
    if kind == "D":
        return n[:2], ((n[0], n[1]),)
    if kind == "Q":
        c, b, e = n[:3]
        return [c, b, e, n[3] if len(n) > 3 else c], ((b, e), (c, e))  # substrate on the collector
    d, g, s = n[:3]
    if kind == "M" and stype != "vdmos":
        bulk = n[3] if len(n) > 3 else s
        return [d, g, s, bulk], ((d, s), (g, s), (bulk, s))
    return [d, g, s], ((d, s), (g, s))


def _circuit_lines(circuit: Circuit, node_of: Mapping[str, str], dropped: set[int]
                   ) -> tuple[list[_Line], list[str], dict[str, str]]:
    models: list[_Line] = []
    lines: list[_Line] = []
    blame: dict[str, str] = {}
    inductors: list[str] = []
    l_ident: dict[str, str] = {}
    model_ident: dict[tuple[str, str], tuple[str, str]] = {}
    counts: dict[str, int] = {}

    def new_ident(kind: str) -> str:
        counts[kind] = counts.get(kind, 0) + 1
        return f"{kind.lower()}{counts[kind]}"

    coupled = {name for c in circuit.couplings for name in c.inductors}
    for index, e in enumerate(circuit.elements):
        if e.kind not in ("R", "C", "L", "D", "Q", "M", "J") or _is_short(e) or index in dropped:
            continue
        part = e.part or e.name
        n = [node_of[p] for p in e.nodes]
        if e.kind in ("R", "C", "L", "D") and len(set(n)) == 1 and e.name not in coupled:
            continue  # both ends on one node: carries nothing
        if e.kind in ("R", "C", "L"):
            value = _value(e, {"R": "ohm", "C": "F", "L": "H"}[e.kind])
            if len(n) != 2 or (e.kind == "C" and value == 0.0):
                continue
            ident = new_ident(e.kind)
            blame[ident] = part
            text = f"{ident} {n[0]} {n[1]} {number(value)}"
            if e.kind == "R":
                lines.append(_Line(text))
            elif e.kind == "C":
                lines.append(_Line(text, "C", ((n[0], n[1]),)))
            else:
                lines.append(_Line(text, "L", ident=ident))
                inductors.append(ident)
                l_ident[e.name] = ident
            continue
        if len(n) < _PINS[e.kind]:
            raise EngineError(f"{part} has {len(n)} pins, a {e.kind} part needs {_PINS[e.kind]}",
                              f"check the line of {part} in the netlist")
        key = (e.model.name if e.model is not None else "", e.kind)
        if key not in model_ident:
            mident = f"mdl{len(model_ident) + 1}"
            card, stype = _model_card(mident, e.model, e.kind, part)
            model_ident[key] = (mident, stype)
            models.append(_Line(card))
            blame[mident] = f"the .model card {e.model.name} of {part}" if e.model is not None else part
        mident, stype = model_ident[key]
        ident = new_ident(e.kind)
        blame[ident] = f"the .model card {e.model.name} of {part}" if e.model is not None else part
        pins, pairs = _semiconductor(n, e.kind, stype)
        words = _instance_words(e, "VDMOS" if stype == "vdmos" else e.kind)
        lines.append(_Line(" ".join([ident, *pins, mident, *words]), e.kind, pairs, ident))
    for c in circuit.couplings:
        a, b = (l_ident.get(name) for name in c.inductors)
        if a is None or b is None:
            continue
        if not math.isfinite(c.k) or not 0 < abs(c.k) <= 1:
            raise EngineError(f"{c.name}: coupling {c.k!r} is outside 0..1", f"check the line of {c.name}")
        ident = new_ident("K")
        blame[ident] = c.name
        lines.append(_Line(f"{ident} {a} {b} {number(c.k)}"))
    return [*models, *lines], inductors, blame


def build(board: Board, probe_nets: Sequence[str], stray: float) -> Deck:
    """The deck of ``board`` with probes on ``probe_nets``.

    Raises
    ------
    EngineError
        When a part cannot be written (no value, a model of the wrong type,
        a parameter that is not a number), naming the part.
    """
    if not math.isfinite(stray) or stray < 0:
        raise ValueError(f"stray capacitance must be >= 0, got {stray!r}")
    circuit = elements(board)
    for e in circuit.elements:
        if e.kind in ("R", "C", "L"):
            _value(e, {"R": "ohm", "C": "F", "L": "H"}[e.kind])
    node_of, dropped = simplify(circuit, probe_nets)
    lines, inductors, blame = _circuit_lines(circuit, node_of, dropped)
    nodes = tuple(dict.fromkeys(node_of.values()))
    probe_nodes = tuple(node_of[p] for p in probe_nets)
    return Deck(
        node_of=node_of,
        nodes=nodes,
        probe_nodes=probe_nodes,
        stray=float(stray),
        lines=tuple(lines),
        inductors=tuple(inductors),
        anchors=anchors(circuit, node_of, probe_nodes, probe_nodes if stray > 0 else ()),
        reported=_reported(board, circuit, probe_nets),
        blame=blame,
    )


def _reported(board: Board, circuit: Circuit, probe_nets: Sequence[str]) -> tuple[str, ...]:
    joined = Nets(probe_nets)
    for e in circuit.elements:
        for p in e.nodes[1:]:
            joined.join(e.nodes[0], p)
    roots = {joined.find(p) for p in probe_nets}
    return tuple(n for n in sorted({*board.nets, *probe_nets}) if joined.find(n) in roots)
