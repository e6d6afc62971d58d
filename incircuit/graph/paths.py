"""The search for every other path between two nets, one kind at a time."""

from __future__ import annotations

import difflib
from itertools import combinations
from typing import Iterable

import networkx as nx

from ..errors import InputError
from ..model import Board
from .dc import equivalent_resistance, tied_nets
from .edges import dc_ohms, edges, pin_roles
from .results import PATH_KINDS, Between, Link, Path, Surroundings

__all__ = ["MAX_PATH_PARTS", "MAX_PATHS", "MAX_SEARCH_STEPS", "between", "surroundings"]

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
    for e in edges(board, skip):
        dcr = e.part.params.get("dcr") if e.part.kind == "L" else None
        value = dc_ohms(e.part) if e.part.kind == "X" else e.part.value
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

    >>> from incircuit.model import Part
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
