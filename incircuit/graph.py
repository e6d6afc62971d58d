"""The board as a graph: the paths around a part, tied nets, DC resistance.

Nets are the nodes of a :class:`networkx.MultiGraph` and parts its edges.
A part with more than two pins (transistor, unmodelled chip) gives one edge
per pair of its pins, tagged with the pins it crosses. Three questions are
answered from that view:

* :func:`between` / :func:`surroundings`: every *other* path that joins two
  nets (simple paths, shortest first, at most :data:`MAX_PATH_PARTS` parts
  long and :data:`MAX_PATHS` of each kind), each with its parts in order and
  grouped by what it is made of (:data:`PATH_KINDS`);
* :func:`equivalent_resistance`: the DC resistance of the rest of the board
  between two nets (Klein & Randic, "Resistance distance", J. Math. Chem. 12
  (1993): the Laplacian of the conductance graph, solved with one net
  grounded, which equals their pseudo-inverse formula);
* :func:`tied_nets`: groups of nets joined by parts that act as a wire
  (inductors and resistors below :data:`TIE_OHMS`).

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 10e3), Part("R2", "R", ("A", "M"), 4.7e3),
...                 Part("R3", "R", ("M", "B"), 10e3), Part("C1", "C", ("A", "B"), 1e-7)))
>>> s = surroundings(b, "R1")
>>> [(p.kind, p.parts, p.dc_resistance) for p in s.paths]
[('resistive', ('R2', 'R3'), 14700.0), ('capacitive', ('C1',), None)]
>>> s.paths[0].describe()
'R2 (4.7 kohm) and R3 (10 kohm) in series: 14.7 kohm'
>>> round(s.equivalent_resistance)
14700
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field
from itertools import combinations
from typing import Iterable, Iterator

import networkx as nx
import numpy as np

from .errors import InputError
from .model import Board, Part, Tolerance
from .units import format_value

__all__ = [
    "Link",
    "Path",
    "Between",
    "Surroundings",
    "board_graph",
    "between",
    "surroundings",
    "equivalent_resistance",
    "tied_nets",
    "tie_parts",
    "is_tie",
    "pin_roles",
    "PATH_KINDS",
    "MAX_PATH_PARTS",
    "MAX_PATHS",
    "MAX_SEARCH_STEPS",
    "TIE_OHMS",
]

#: Longest path reported, in parts. Eight parts reach across any realistic
#: loading network; longer chains carry negligible current in a tester step.
MAX_PATH_PARTS = 8

#: Most paths reported per kind for one pair of nets (shortest first); the
#: rest are cut and :attr:`Between.cut` names the kinds that were.
MAX_PATHS = 50

#: Upper bound on search steps (partial paths extended) per kind and pair
#: of nets, so a dense board cannot stall the search; reaching it also
#: counts as cut.
MAX_SEARCH_STEPS = 50_000

#: A resistor (or an inductor's winding resistance) below this many ohms
#: acts as a wire: against the tester's ~700 ohm and 470 kohm drive
#: resistors it shifts a reading by under about 0.15 % (common practice:
#: fuses, jumpers, ferrite beads and current shunts read as a short).
TIE_OHMS = 1.0

#: Path kinds in reporting order.
PATH_KINDS = ("resistive", "capacitive", "inductive", "mixed", "junction", "chip")

_UNITS = {"R": "ohm", "C": "F", "L": "H"}


# -- pins and edges ---------------------------------------------------------
def pin_roles(part: Part) -> tuple[str, ...]:
    """Names of the part's pins in SPICE order (an unmodelled part's pin
    names from its pin roles, else pin numbers).

    >>> pin_roles(Part("Q1", "Q", ("C", "B", "E"), model="QN"))
    ('C', 'B', 'E')
    >>> pin_roles(Part("U1", "X", ("A", "B", "C"), model="CHIP"))
    ('1', '2', '3')
    >>> pin_roles(Part("U1", "X", ("A", "B"), model="CHIP", params={"pin_names": ("IN", "")}))
    ('IN', '2')
    """
    n = len(part.pins)
    named = {"D": ("A", "K"), "Q": ("C", "B", "E", "S"), "M": ("D", "G", "S", "B"), "J": ("D", "G", "S")}
    roles = named.get(part.kind)
    if roles is not None and n <= len(roles):
        return roles[:n]
    names = tuple(part.params.get("pin_names") or ()) if part.kind == "X" else ()  # type: ignore[arg-type]
    return tuple(str(names[i]).upper() if i < len(names) and names[i] else str(i + 1) for i in range(n))


def _model_type(part: Part, board: Board) -> str:
    model = board.models.get(part.model or "")
    return model.type.upper() if model is not None else ""


def _nature_and_forward(part: Part, board: Board, a: str, b: str) -> tuple[str, str | None]:
    """What crossing pins ``a`` -> ``b`` goes through, and the pin a junction
    conducts from ("a" if current flows a -> b forward, "b" the other way,
    None for no single direction)."""
    kind = part.kind
    if kind in ("R", "C", "L"):
        return kind, None
    if kind == "D":
        return "junction", ("a" if a == "A" else "b")
    if kind == "X":
        return "chip", None
    mtype = _model_type(part, board)
    if kind == "Q":
        if "S" in (a, b) or {a, b} == {"C", "E"}:
            return "junction", None
        p_side = "B" if mtype != "PNP" else ({a, b} - {"B"}).pop()
        return "junction", ("a" if a == p_side else "b")
    if kind == "M":
        if "G" in (a, b):
            return "gate", None
        # bulk junctions: p-type bulk (NMOS) conducts bulk -> drain/source
        bulk_p = mtype != "PMOS"
        if "B" in (a, b):
            return "junction", ("a" if (a == "B") == bulk_p else "b")
        return "junction", None
    if kind == "J":
        if "G" in (a, b):
            gate_p = mtype != "PJF"
            return "junction", ("a" if (a == "G") == gate_p else "b")
        return "junction", None
    return "chip", None


@dataclass(frozen=True)
class _Edge:
    part: Part
    roles: tuple[str, str]
    nets: tuple[str, str]
    nature: str
    forward: str | None  # "a": conducts roles[0] -> roles[1]


def _whole_role(part: Part) -> str | None:
    """The whole-part role an unmodelled part carries once pin roles are
    applied (``incircuit.chips``): "short" (fuse, bead, link, closed
    switch), "open" (connector, crystal, open switch), or None."""
    if part.kind != "X":
        return None
    roles = tuple(part.params.get("roles") or ())  # type: ignore[arg-type]
    if not roles or roles[0] not in ("short", "open", "switch"):
        return None
    if roles[0] == "switch":
        return "short" if part.params.get("switch_state") == "closed" else "open"
    return roles[0]


def _open_pins(part: Part) -> set[int]:
    """Pins of an unmodelled part known to connect to nothing inside it."""
    roles = tuple(part.params.get("roles") or ())  # type: ignore[arg-type]
    return {i for i, r in enumerate(roles) if r in ("open", "no-connect")}


def _edges(board: Board, skip: frozenset[str]) -> Iterator[_Edge]:
    for part in board.parts:
        if part.name in skip or part.kind == "K":
            continue
        roles = pin_roles(part)
        whole = _whole_role(part)
        if whole == "open":
            continue
        if whole == "short":
            if len(part.pins) == 2 and part.pins[0] != part.pins[1]:
                yield _Edge(part, (roles[0], roles[1]), (part.pins[0], part.pins[1]), "R", None)
            continue
        closed = _open_pins(part) if part.kind == "X" else set()
        seen: set[frozenset[str]] = set()
        for i, j in combinations(range(len(part.pins)), 2):
            u, v = part.pins[i], part.pins[j]
            key = frozenset((u, v))
            if u == v or key in seen or i in closed or j in closed:  # one net, a repeat, or no inside
                continue
            seen.add(key)
            ra, rb = roles[i], roles[j]
            if part.kind == "M" and len(part.pins) == 4:
                # a bulk tied to the source (or drain) puts its junction across D-S
                tied = {part.pins[k]: "B" for k in (0, 2) if part.pins[k] == part.pins[3]}
                ra, rb = tied.get(u, ra) if ra != "G" else ra, tied.get(v, rb) if rb != "G" else rb
            nature, forward = _nature_and_forward(part, board, ra, rb)
            yield _Edge(part, (roles[i], roles[j]), (u, v), nature, forward)


def board_graph(board: Board, without: Iterable[str] = ()) -> nx.MultiGraph:
    """The board as a MultiGraph: nets are nodes, parts (or pin pairs) edges.

    Edge keys are the part name (two-pin parts) or ``"Q1:B-E"``; each edge
    carries ``part``, ``kind``, ``roles`` and ``pin_nets`` (the pins' nets in
    the order of ``roles``), ``nature`` (R, C, L, junction, gate, chip),
    ``forward`` and ``value``. Parts named in ``without`` are left out.

    >>> from incircuit.model import Part
    >>> g = board_graph(Board("t", (Part("Q1", "Q", ("C", "B", "E"), model="QN"),)))
    >>> sorted(k for _, _, k in g.edges(keys=True))
    ['Q1:B-E', 'Q1:C-B', 'Q1:C-E']
    """
    skip = frozenset(n.upper() for n in without)
    g = nx.MultiGraph()
    g.add_nodes_from(n for n in board.nets)
    for e in _edges(board, skip):
        key = e.part.name if len(e.part.pins) == 2 else f"{e.part.name}:{e.roles[0]}-{e.roles[1]}"
        g.add_edge(*e.nets, key=key, part=e.part.name, kind=e.part.kind, roles=e.roles,
                   pin_nets=e.nets, nature=e.nature, forward=e.forward,
                   value=_dc_ohms(e.part) if e.part.kind == "X" else e.part.value)
    return g


# -- results ----------------------------------------------------------------
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


# -- ties and DC resistance -------------------------------------------------
def _dc_ohms(part: Part) -> float | None:
    """A part's DC resistance if it conducts at DC as a plain resistance."""
    if part.kind == "R" and part.value is not None:
        return max(float(part.value), 0.0)
    if part.kind == "L":
        return max(float(part.params.get("dcr", 0.0) or 0.0), 0.0)  # type: ignore[arg-type]
    if _whole_role(part) == "short" and len(part.pins) == 2:
        return max(float(part.params.get("short_ohms", 0.0) or 0.0), 0.0)  # type: ignore[arg-type]
    return None


def is_tie(part: Part) -> bool:
    """True for a part that acts as a wire: an inductor or a resistor below
    :data:`TIE_OHMS` (an inductor's ``dcr`` counts), or an unmodelled part
    whose pin roles make it a short (fuse, bead, link, closed switch; its
    ``short_ohms``, a wire when none)."""
    ohms = _dc_ohms(part)
    return ohms is not None and len(set(part.pins)) == 2 and ohms < TIE_OHMS


def tied_nets(board: Board) -> list[frozenset[str]]:
    """Groups of two or more nets joined by tie parts (see :func:`is_tie`),
    sorted by their first net name.

    >>> b = Board("t", (Part("L1", "L", ("A", "B"), 1e-6), Part("R1", "R", ("B", "C"), 0.0),
    ...                 Part("R2", "R", ("C", "D"), 10.0)))
    >>> [sorted(group) for group in tied_nets(b)]
    [['A', 'B', 'C']]
    """
    g = nx.Graph()
    g.add_edges_from(p.pins[:2] for p in board.parts if is_tie(p))
    groups = [frozenset(c) for c in nx.connected_components(g) if len(c) > 1]
    return sorted(groups, key=lambda s: sorted(s))


def tie_parts(board: Board, group: Iterable[str]) -> tuple[str, ...]:
    """Names of the tie parts that join the nets of one tied ``group``.

    >>> b = Board("t", (Part("L1", "L", ("A", "B"), 1e-6), Part("R1", "R", ("A", "B"), 10.0)))
    >>> tie_parts(b, tied_nets(b)[0])
    ('L1',)
    """
    nets = set(group)
    return tuple(p.name for p in board.parts if is_tie(p) and set(p.pins[:2]) <= nets)


def equivalent_resistance(board: Board, a: str, b: str, without: Iterable[str] = ()) -> float:
    """DC resistance between nets ``a`` and ``b`` of the board's resistors and
    inductors (an inductor is its ``dcr``, a wire when none), leaving out
    the parts named in ``without``; ``inf`` when they do not connect the nets.

    Zero-ohm parts merge their nets; the rest form a weighted Laplacian,
    solved with ``b`` grounded (equal to the pseudo-inverse form of Klein &
    Randic 1993).

    >>> b = Board("t", (Part("R1", "R", ("A", "B"), 100.0), Part("R2", "R", ("A", "B"), 100.0)))
    >>> equivalent_resistance(b, "A", "B")
    50.0
    >>> equivalent_resistance(b, "A", "B", without=["R1", "R2"])
    inf
    """
    a, b = a.upper(), b.upper()
    skip = {n.upper() for n in without}
    parent: dict[str, str] = {}

    def find(x: str) -> str:
        parent.setdefault(x, x)
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    resistors: list[tuple[str, str, float]] = []
    for part in board.parts:
        ohms = _dc_ohms(part) if part.name not in skip else None
        if ohms is None or part.pins[0] == part.pins[1]:
            continue
        if ohms == 0.0:
            parent[find(part.pins[0])] = find(part.pins[1])
        else:
            resistors.append((part.pins[0], part.pins[1], ohms))
    ra, rb = find(a), find(b)
    if ra == rb:
        return 0.0
    g = nx.Graph()
    g.add_nodes_from((ra, rb))
    for u, v, ohms in resistors:
        u, v = find(u), find(v)
        if u != v:
            w = g.get_edge_data(u, v, {"g": 0.0})["g"]
            g.add_edge(u, v, g=w + 1.0 / ohms)
    component = nx.node_connected_component(g, ra)
    if rb not in component:
        return math.inf
    nodes = [n for n in component if n != rb]
    index = {n: i for i, n in enumerate(nodes)}
    lap = np.zeros((len(nodes), len(nodes)))
    for u, v, data in g.subgraph(component).edges(data=True):
        w = data["g"]
        for x, y in ((u, v), (v, u)):
            if x in index:
                lap[index[x], index[x]] += w
                if y in index:
                    lap[index[x], index[y]] -= w
    rhs = np.zeros(len(nodes))
    rhs[index[ra]] = 1.0
    return float(np.linalg.solve(lap, rhs)[index[ra]])


# -- paths ------------------------------------------------------------------
def _path_kind(links: tuple[Link, ...]) -> str:
    natures = {k.nature for k in links}
    if "chip" in natures:
        return "chip"
    if "junction" in natures:
        return "junction"
    natures = {"C" if n == "gate" else n for n in natures}
    single = {"R": "resistive", "C": "capacitive", "L": "inductive"}
    return single[natures.pop()] if len(natures) == 1 else "mixed"


def _make_path(links: tuple[Link, ...], start: str) -> Path:
    kind = _path_kind(links)
    dc: float | None = None
    if all(k.nature in ("R", "L") for k in links):
        dc = 0.0
        for k in links:
            dc += float(k.value or 0.0) if k.nature == "R" else float(k.dcr or 0.0)
    nets = (start,) + tuple(k.nets[1] for k in links)
    return Path(kind, tuple(k.part for k in links), nets, dc, links)


#: What each kind's search may cross; a kind keeps only the paths that
#: classify as that kind (a mixed search also meets resistive paths).
_STAGES = (
    ("resistive", frozenset({"R"})),
    ("capacitive", frozenset({"C", "gate"})),
    ("inductive", frozenset({"L"})),
    ("mixed", frozenset({"R", "C", "L", "gate"})),
    ("junction", frozenset({"R", "C", "L", "gate", "junction"})),
    ("chip", frozenset({"R", "C", "L", "gate", "junction", "chip"})),
)


def _adjacency(board: Board, skip: frozenset[str]) -> dict[str, list[tuple[str, Link]]]:
    adj: dict[str, list[tuple[str, Link]]] = {}
    for e in _edges(board, skip):
        dcr = e.part.params.get("dcr") if e.part.kind == "L" else None
        value = _dc_ohms(e.part) if e.part.kind == "X" else e.part.value
        for (u, v), (ru, rv), fwd in (
            (e.nets, e.roles, {"a": True, "b": False, None: None}[e.forward]),
            (e.nets[::-1], e.roles[::-1], {"a": False, "b": True, None: None}[e.forward]),
        ):
            link = Link(e.part.name, e.part.kind, (ru, rv), (u, v), e.nature, value,
                        e.part.model, e.part.tolerance, fwd, float(dcr) if dcr else None)  # type: ignore[arg-type]
            adj.setdefault(u, []).append((v, link))
    return adj


def _search_kind(adj: dict[str, list[tuple[str, Link]]], a: str, b: str, kind: str,
                 natures: frozenset[str]) -> tuple[list[Path], bool]:
    """Paths of one kind, shortest first (iterative deepening, pruned by the
    hop distance to ``b``); True when the count or step limit cut the list."""
    sub = {u: [(v, k) for v, k in links if k.nature in natures] for u, links in adj.items()}
    g = nx.Graph()
    g.add_nodes_from((a, b))
    g.add_edges_from((u, v) for u, links in sub.items() for v, _ in links)
    dist = nx.single_source_shortest_path_length(g, b, cutoff=MAX_PATH_PARTS)
    if a not in dist:
        return [], False
    found: list[Path] = []
    steps = 0
    for length in range(dist[a], MAX_PATH_PARTS + 1):
        stack: list[tuple[str, tuple[Link, ...], frozenset[str], frozenset[str]]] = [
            (a, (), frozenset((a,)), frozenset())
        ]
        while stack:
            net, links, visited, used = stack.pop()
            steps += 1
            if steps > MAX_SEARCH_STEPS:
                return found, True
            depth = len(links)
            for nxt, link in reversed(sub.get(net, ())):
                if link.part in used:
                    continue
                if nxt == b:
                    if depth + 1 == length:
                        path = _make_path(links + (link,), a)
                        if path.kind == kind:
                            found.append(path)
                            if len(found) >= MAX_PATHS:
                                return found, True
                    continue
                if nxt in visited or depth + 1 + dist.get(nxt, MAX_PATH_PARTS + 1) > length:
                    continue
                stack.append((nxt, links + (link,), visited | {nxt}, used | {link.part}))
    return found, False


def _search(board: Board, a: str, b: str, skip: frozenset[str]) -> tuple[list[Path], tuple[str, ...]]:
    adj = _adjacency(board, skip)
    paths: list[Path] = []
    cut: list[str] = []
    for kind, natures in _STAGES:
        found, was_cut = _search_kind(adj, a, b, kind, natures)
        paths.extend(found)
        if was_cut:
            cut.append(kind)
    return _ordered(paths), tuple(cut)


def _ordered(paths: list[Path]) -> list[Path]:
    rank = {k: i for i, k in enumerate(PATH_KINDS)}
    return sorted(paths, key=lambda p: (rank[p.kind], len(p.parts), p.dc_resistance or 0.0, p.parts))


def _check_net(board: Board, net: str) -> str:
    """The board's name for ``net``; GND means node 0 as in ngspice when the
    board has no net of that name."""
    key = net.upper()
    nets = board.nets
    if key == "GND" and key not in nets and "0" in nets:
        key = "0"
    if key not in nets:
        raise InputError(f"no net {net!r} on this board{_did_you_mean(key, nets)}", board.path)
    return key


def _did_you_mean(key: str, names: Iterable[str]) -> str:
    close = difflib.get_close_matches(key, list(names), n=4, cutoff=0.5)
    return f" (did you mean {', '.join(close)}?)" if close else ""


def between(board: Board, net_a: str, net_b: str, without: Iterable[str] = (),
            pins: tuple[str, ...] = ()) -> Between:
    """Every path joining ``net_a`` and ``net_b`` that avoids the parts in
    ``without``, grouped by kind, with the DC resistance of the rest.

    >>> b = Board("t", (Part("R1", "R", ("A", "B"), 1e3), Part("L1", "L", ("A", "B"), 1e-3)))
    >>> r = between(b, "a", "b")
    >>> [(p.kind, p.parts) for p in r.paths], r.tied, r.equivalent_resistance
    ([('resistive', ('R1',)), ('inductive', ('L1',))], True, 0.0)
    """
    a, b = _check_net(board, net_a), _check_net(board, net_b)
    skip = frozenset(n.upper() for n in without)
    paths, cut = _search(board, a, b, skip) if a != b else ([], ())
    rest = Board(board.name, tuple(p for p in board.parts if p.name not in skip))
    tied = a == b or any({a, b} <= group for group in tied_nets(rest))
    return Between(
        (a, b), tuple(paths), cut,
        equivalent_resistance(board, a, b, skip), tied, pins, tuple(sorted(skip)),
    )


def surroundings(board: Board, part: str) -> Surroundings:
    """The paths around ``part`` (without the part itself), per pin pair.

    InputError when the board has no such part.
    """
    if not board.has_part(part):
        names = [q.name for q in board.parts]
        raise InputError(f"no part {part!r} on this board{_did_you_mean(part.upper(), names)}", board.path)
    p = board.part(part)
    roles = pin_roles(p)
    pairs = []
    seen: set[frozenset[str]] = set()
    for i, j in combinations(range(len(p.pins)), 2):
        key = frozenset((p.pins[i], p.pins[j]))
        if p.pins[i] == p.pins[j] or key in seen:
            continue
        seen.add(key)
        pairs.append(between(board, p.pins[i], p.pins[j], (p.name,), (roles[i], roles[j])))
    groups = tuple(g for g in tied_nets(board) if g & set(p.pins))
    return Surroundings(p.name, p.kind, p.pins, tuple(pairs), groups)
