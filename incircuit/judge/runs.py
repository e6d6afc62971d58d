"""Cached identification runs: judging one part asks for many.

Sensitivity, tolerance extremes, every fault and every lift candidate is
one more identification run on a changed board. :class:`Runs` keys each run
by the board's content and the probe nets, so a board met twice (a fault
that equals a tolerance extreme, a lift that isolates the part exactly as
the isolated view does) is simulated once.

>>> from incircuit.model import Board, Part
>>> a = Board("t", (Part("R1", "R", ("A", "B"), 1e3),))
>>> board_key(a) == board_key(Board("other name", (Part("R1", "R", ("A", "B"), 1e3),)))
True
"""

from __future__ import annotations

from dataclasses import replace
from typing import Callable, Sequence

from ..model import Board, Model, Part, Reading

__all__ = ["Runs", "board_key", "with_model_param", "isolated_probes"]


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


def board_key(board: Board) -> tuple:
    """A hashable fingerprint of everything that affects a simulation."""
    parts = tuple((p.name, p.kind, p.pins, p.value, p.model, _freeze(p.params)) for p in board.parts)
    models = tuple(sorted((name, m.type, _freeze(m.params)) for name, m in board.models.items()))
    return parts, models


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


def isolated_probes(board: Board, part: str, probes: Sequence[str]) -> tuple[str, ...]:
    """The probes as they land on the part alone (the same nets)."""
    return tuple(probes)


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

    def seed(self, board: Board, probes: Sequence[str], run: object) -> None:
        """Store a run already made (e.g. the prediction's own runs)."""
        self._cache[(board_key(board), tuple(probes))] = run

    def run(self, board: Board, probes: Sequence[str]):
        key = (board_key(board), tuple(probes))
        if key in self._cache:
            self.hits += 1
            return self._cache[key]
        self.calls += 1
        result = self._identify(board, tuple(probes), profile=self.profile, engine=self.engine)
        self._cache[key] = result
        return result

    def reading(self, board: Board, probes: Sequence[str]) -> Reading:
        return self.run(board, probes).reading  # type: ignore[attr-defined]

    def isolated(self, board: Board, part: str, probes: Sequence[str]) -> Reading:
        """The reading of ``part`` alone on the same probe nets."""
        return self.reading(board.only(part), isolated_probes(board, part, probes))

    def with_value(self, board: Board, part: Part, factor: float) -> Board:
        return board.with_part(part.with_value(float(part.value) * factor))  # type: ignore[arg-type]
