"""The search for every other path between two nets, one kind at a time."""

from __future__ import annotations

import difflib
from itertools import combinations
from typing import Callable, Iterable

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


#: Per kind: the natures its search may cross, the bit each nature sets in
#: the path's mask, and the masks that make a path of that kind. The masks
#: steer the search: a junction search never walks a branch that cannot
#: reach the far net through a junction within the length limit.
_R, _C, _L, _J, _X = 1, 2, 4, 8, 16
_STAGES: tuple[tuple[str, frozenset[str], dict[str, int], object], ...] = (
    ("resistive", frozenset({"R"}), {}, lambda m: True),
    ("capacitive", frozenset({"C", "gate"}), {}, lambda m: True),
    ("inductive", frozenset({"L"}), {}, lambda m: True),
    ("mixed", frozenset({"R", "C", "L", "gate"}), {"R": _R, "C": _C, "gate": _C, "L": _L},
     lambda m: bin(m).count("1") >= 2),
    ("junction", frozenset({"R", "C", "L", "gate", "junction"}), {"junction": _J}, lambda m: bool(m & _J)),
    ("chip", frozenset({"R", "C", "L", "gate", "junction", "chip"}), {"chip": _X}, lambda m: bool(m & _X)),
)

_Adjacency = dict[str, list[tuple[str, Link]]]


class _Cut(Exception):
    """The count or step limit ended one kind's search."""


def _adjacency(board: Board, skip: frozenset[str]) -> _Adjacency:
    adj: _Adjacency = {}
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


def _distances(sub: dict[str, list[tuple[str, Link, int]]], b: str, masks: list[int],
               accept: Callable[[int], bool]) -> dict[tuple[str, int], int]:
    """Fewest hops from (net, mask so far) to ``b`` ending in an accepted mask
    (breadth-first, backwards over the product of nets and masks)."""
    back: dict[str, list[tuple[str, int]]] = {}
    for u, links in sub.items():
        for v, _, bit in links:
            back.setdefault(v, []).append((u, bit))
    dist = {(b, m): 0 for m in masks if accept(m)}
    frontier = list(dist)
    for hops in range(1, MAX_PATH_PARTS + 1):
        nxt = []
        for v, m2 in frontier:
            for u, bit in back.get(v, ()):
                if bit & ~m2:
                    continue  # this edge would set a bit m2 lacks
                for m in ((m2, m2 & ~bit) if bit else (m2,)):  # the masks that become m2 here
                    if (u, m) not in dist:
                        dist[(u, m)] = hops
                        nxt.append((u, m))
        frontier = nxt
    return dist


def _search_kind(adj: _Adjacency, a: str, b: str, stage) -> tuple[list[Path], bool]:
    """Paths of one kind, shortest first (iterative deepening, pruned by the
    distance to ``b``); True when the count or step limit cut the list."""
    kind, natures, bits, accept = stage
    sub = {u: [(v, k, bits.get(k.nature, 0)) for v, k in links if k.nature in natures]
           for u, links in adj.items()}
    masks = sorted({m for m in range(32) if m & ~sum(set(bits.values())) == 0})
    dist = _distances(sub, b, masks, accept)
    if (a, 0) not in dist:
        return [], False
    found: list[Path] = []
    steps = 0
    far = MAX_PATH_PARTS + 1
    links: list[Link] = []
    visited = {a}
    used: set[str] = set()

    def walk(net: str, mask: int, length: int) -> None:
        nonlocal steps
        steps += 1
        if steps > MAX_SEARCH_STEPS:
            raise _Cut
        depth = len(links)
        for nxt, link, bit in sub.get(net, ()):
            if link.part in used:
                continue
            m2 = mask | bit
            if nxt == b:
                if depth + 1 == length and accept(m2):
                    path = _make_path((*links, link), a)
                    if path.kind == kind:
                        found.append(path)
                        if len(found) >= MAX_PATHS:
                            raise _Cut
                continue
            if nxt in visited or depth + 1 + dist.get((nxt, m2), far) > length:
                continue
            links.append(link)
            visited.add(nxt)
            used.add(link.part)
            walk(nxt, m2, length)
            links.pop()
            visited.discard(nxt)
            used.discard(link.part)

    try:
        for length in range(dist[(a, 0)], MAX_PATH_PARTS + 1):
            walk(a, 0, length)
    except _Cut:
        return found, True
    return found, False


def _search(adj: _Adjacency, a: str, b: str) -> tuple[list[Path], tuple[str, ...]]:
    paths: list[Path] = []
    cut: list[str] = []
    for stage in _STAGES:
        found, was_cut = _search_kind(adj, a, b, stage)
        paths.extend(found)
        if was_cut:
            cut.append(stage[0])
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
    return _between(board, a, b, skip, pins, _adjacency(board, skip))


def _between(board: Board, a: str, b: str, skip: frozenset[str], pins: tuple[str, ...],
             adj: _Adjacency) -> Between:
    paths, cut = _search(adj, a, b) if a != b else ([], ())
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
    skip = frozenset((p.name,))
    adj = _adjacency(board, skip)  # shared by every pin pair
    pairs = []
    seen: set[frozenset[str]] = set()
    for i, j in combinations(range(len(p.pins)), 2):
        key = frozenset((p.pins[i], p.pins[j]))
        if p.pins[i] == p.pins[j] or key in seen:
            continue
        seen.add(key)
        pairs.append(_between(board, p.pins[i], p.pins[j], skip, (roles[i], roles[j]), adj))
    groups = tuple(g for g in tied_nets(board) if g & set(p.pins))
    return Surroundings(p.name, p.kind, p.pins, tuple(pairs), groups)
