"""Cached identification runs: judging one part asks for many.

Sensitivity, tolerance extremes, every fault and every lift candidate is one
more identification run on a changed board. Two things keep that cheap:

* **Only what the probes can reach is simulated.** The tester touches the
  board at the probed nets only; a piece of the board that hangs from the
  rest by a single net carries no current between the probes (Kirchhoff's
  current law across that one-node cut), at any instant, whatever it holds.
  :func:`reachable` keeps the parts that share a biconnected block with the
  probed nets (a virtual hub joins them; nets and parts are the nodes of
  the graph, a K coupling joins its two inductors' nets), which gives the
  same reading from a smaller board.
* **Every run is cached** under a key of the reduced board's content with
  canonical net names (probed nets first, then in order of appearance) and
  model parameters instead of model names. A lifted leg with the probe on
  it, for instance, is the part alone, and the isolated run is reused.

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 1e3), Part("R2", "R", ("B", "C"), 1e3),
...                 Part("C1", "C", ("C", "0"), 1e-9), Part("R3", "R", ("A", "B"), 5e3)))
>>> [p.name for p in reachable(b, ("A", "B")).parts]
['R1', 'R3']
>>> board_key(b.lifted("R1", 1).only("R1"), ("R1.PIN1~LIFTED", "B")) == board_key(b.only("R1"), ("A", "B"))
True
"""

from __future__ import annotations

from dataclasses import replace
from typing import Callable, Sequence

import networkx as nx
import numpy as np

from ..errors import EngineError
from ..model import Board, Model, Part, Reading

__all__ = ["Runs", "board_key", "reachable", "with_model_param", "RUN_FAILURES", "OPEN_STUB_OHMS"]

#: What a failed simulation of one changed board may raise; the judge then
#: goes on without that run (one bad board never loses the others).
RUN_FAILURES = (EngineError, ValueError, ArithmeticError, np.linalg.LinAlgError)

#: A probed net that nothing reaches any more (an open part alone on its
#: pads) keeps a resistor of this many ohms to the other probed net, so the
#: probe still has a pad to touch: a tera-ohm is far beyond every range of
#: the tester and of the bench instruments (nothing found).
OPEN_STUB_OHMS = 1e12


def _freeze(value: object) -> object:
    if isinstance(value, (list, tuple)):
        return tuple(_freeze(v) for v in value)
    if isinstance(value, dict) or hasattr(value, "items"):
        return tuple(sorted((str(k), _freeze(v)) for k, v in value.items()))  # type: ignore[union-attr]
    try:
        hash(value)
    except TypeError:
        return repr(value)
    return value


def _part_nets(board: Board, part: Part) -> set[str]:
    if part.kind != "K":
        return set(part.pins)
    names = {str(n).upper() for n in part.params.get("inductors", ())}  # type: ignore[union-attr]
    return {n for q in board.parts if q.name in names for n in q.pins}


def reachable(board: Board, probes: Sequence[str]) -> Board:
    """The board without the parts that cannot carry current between the
    probed nets (see the module notes); probed nets left bare get a stub."""
    hub = ("hub", "")
    g = nx.Graph()
    for part in board.parts:
        for net in _part_nets(board, part):
            g.add_edge(("part", part.name), ("net", net))
    for net in set(probes):
        g.add_edge(hub, ("net", net))
    keep: set[str] = set()
    if len(set(probes)) > 1:
        for block in nx.biconnected_components(g):
            if hub in block:
                keep |= {name for kind, name in block if kind == "part"}
    out = replace(board, parts=tuple(p for p in board.parts if p.name in keep))
    nets = list(dict.fromkeys(probes))
    for i, net in enumerate(nets):
        if net not in set(out.nets) and len(nets) > 1:
            other = nets[1] if i == 0 else nets[0]
            out = out.with_part(Part(f"~STUB{i + 1}", "R", (net, other), OPEN_STUB_OHMS))
    return out


def board_key(board: Board, probes: Sequence[str] = ()) -> tuple:
    """A hashable fingerprint of everything that affects a reading on
    ``probes``: canonical net names, model contents instead of names."""
    names: dict[str, str] = {}
    for net in probes:
        names.setdefault(net, f"~P{len(names) + 1}")
    for part in board.parts:
        for net in part.pins:
            names.setdefault(net, f"~N{len(names) + 1}")

    def model(name: str | None) -> object:
        m = board.models.get(name or "")
        return (m.type, _freeze(m.params)) if m is not None else name

    parts = tuple((p.name, p.kind, tuple(names[n] for n in p.pins), p.value, model(p.model),
                   _freeze(p.params)) for p in board.parts)
    return parts, tuple(names[n] for n in probes)


def with_model_param(board: Board, part: str, key: str, value: float) -> Board:
    """The board with one part's model parameter changed, for that part only
    (its model is copied under a name of its own)."""
    p = board.part(part)
    base = board.models.get(p.model or "")
    mtype = base.type if base is not None else {"D": "D", "Q": "NPN", "M": "NMOS", "J": "NJF"}[p.kind]
    params = dict(base.params) if base is not None else {}
    params[key] = value
    name = f"{p.model or p.kind}~{p.name}"
    models = dict(board.models)
    models[name] = Model(name, mtype, params)
    return replace(board, models=models).with_part(replace(p, model=name))


class Runs:
    """Identification runs of one instrument profile and engine, cached.

    ``identify`` is :func:`incircuit.predict.identify` (or any function of
    the same signature).
    """

    def __init__(self, identify: Callable, profile, engine: str):
        self._identify = identify
        self.profile = profile
        self.engine = engine
        self._cache: dict[tuple, object] = {}
        self.calls = 0
        self.hits = 0
        #: Messages of the runs that failed, in order.
        self.failures: list[str] = []

    def seed(self, board: Board, probes: Sequence[str], run: object) -> None:
        """Store a run already made (e.g. the prediction's own runs)."""
        self._cache[board_key(reachable(board, probes), probes)] = run

    def run(self, board: Board, probes: Sequence[str]):
        reduced = reachable(board, probes)
        key = board_key(reduced, probes)
        if key in self._cache:
            self.hits += 1
            return self._cache[key]
        self.calls += 1
        result = self._identify(reduced, tuple(probes), profile=self.profile, engine=self.engine)
        self._cache[key] = result
        return result

    def reading(self, board: Board, probes: Sequence[str]) -> Reading:
        return self.run(board, probes).reading  # type: ignore[attr-defined]

    def try_reading(self, board: Board, probes: Sequence[str]) -> Reading | None:
        """The reading, or None when the simulation fails (the failure is kept)."""
        try:
            return self.reading(board, probes)
        except RUN_FAILURES as error:
            self.failures.append(f"{type(error).__name__}: {error}")
            return None

    def isolated(self, board: Board, part: str, probes: Sequence[str]) -> Reading | None:
        """The reading of ``part`` alone on the same probe nets (None: failed)."""
        return self.try_reading(board.only(part), probes)
