"""Nets as nodes, parts as edges: a part with more than two pins gives one
edge per pair of its pins, tagged with the pins it crosses and what lies
between them (R, C, L, junction, gate, chip) and, for a junction, which way
it conducts. Unmodelled parts follow the pin roles that
:mod:`incircuit.chips` attaches (shorts, open parts, no-connect pins).
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import combinations
from typing import Iterable, Iterator

import networkx as nx

from ..model import Board, Part

__all__ = ["pin_roles", "board_graph", "dc_ohms", "whole_role", "Edge", "edges"]


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
class Edge:
    part: Part
    roles: tuple[str, str]
    nets: tuple[str, str]
    nature: str
    forward: str | None  # "a": conducts roles[0] -> roles[1]


def whole_role(part: Part) -> str | None:
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


def edges(board: Board, skip: frozenset[str]) -> Iterator[Edge]:
    for part in board.parts:
        if part.name in skip or part.kind == "K":
            continue
        roles = pin_roles(part)
        whole = whole_role(part)
        if whole == "open":
            continue
        if whole == "short":
            if len(part.pins) == 2 and part.pins[0] != part.pins[1]:
                yield Edge(part, (roles[0], roles[1]), (part.pins[0], part.pins[1]), "R", None)
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
            yield Edge(part, (roles[i], roles[j]), (u, v), nature, forward)


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
    for e in edges(board, skip):
        key = e.part.name if len(e.part.pins) == 2 else f"{e.part.name}:{e.roles[0]}-{e.roles[1]}"
        g.add_edge(*e.nets, key=key, part=e.part.name, kind=e.part.kind, roles=e.roles,
                   pin_nets=e.nets, nature=e.nature, forward=e.forward,
                   value=dc_ohms(e.part) if e.part.kind == "X" else e.part.value)
    return g


def dc_ohms(part: Part) -> float | None:
    """A part's DC resistance if it conducts at DC as a plain resistance."""
    if part.kind == "R" and part.value is not None:
        return max(float(part.value), 0.0)
    if part.kind == "L":
        return max(float(part.params.get("dcr", 0.0) or 0.0), 0.0)  # type: ignore[arg-type]
    if whole_role(part) == "short" and len(part.pins) == 2:
        return max(float(part.params.get("short_ohms", 0.0) or 0.0), 0.0)  # type: ignore[arg-type]
    return None
