"""Survey a whole board: every part predicted and judged, over one or more processes.

The work has two phases:

1. the healthy bands (depths "standard" and "full"): one Monte Carlo band
   per distinct set of probe nets, shared by every part probed there;
2. the parts, each with its band (:func:`.part.survey_part`).

With ``jobs`` > 1 each phase is spread over worker processes
(:class:`concurrent.futures.ProcessPoolExecutor`, forked so the board and
the bands are inherited rather than pickled); results come back in board
order whatever order the workers finish in, so the output does not depend
on ``jobs``. ``progress(done, total, label)`` is called after each item.

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 10e3), Part("R2", "R", ("A", "B"), 10e3)))
>>> s = survey(b, settings=Settings(depth="quick"))
>>> [(r["part"], r["verdict"]) for r in s.records]
[('R1', 'predictable'), ('R2', 'predictable')]
"""

from __future__ import annotations

import multiprocessing
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from typing import Callable, Sequence

from ..bands import Band
from ..model import Board
from ..tester.profile import Profile, load_profile
from .part import PartResult, RunCache, band_for, probes_of, survey_part
from .result import Survey
from .settings import Settings

__all__ = ["survey", "Progress"]

#: ``progress(done, total, label)``.
Progress = Callable[[int, int, str], None]

# What forked workers inherit: (board, profile, settings, bands, runs); each
# process fills its own copy of the run cache.
_STATE: tuple[Board, Profile, Settings, dict, RunCache] | None = None


def _band_task(probes: tuple[str, ...]) -> Band | BaseException:
    assert _STATE is not None
    board, profile, settings, _, _ = _STATE
    try:
        return band_for(board, probes, profile, settings)
    except Exception as error:  # recorded for the parts on these probes; the survey goes on
        return error


def _group_task(names: Sequence[str]) -> list[PartResult]:
    assert _STATE is not None
    board, profile, settings, bands, runs = _STATE
    out = []
    for name in names:
        probes = probes_of(board.part(name))
        out.append(survey_part(board, name, profile, settings, bands.get(probes) if probes else None, runs))
    return out


def _groups(board: Board, names: Sequence[str]) -> list[list[str]]:
    """``names`` grouped by their probe nets (parts on the same nets share
    runs, so one process takes them all), groups in board order."""
    groups: dict[object, list[str]] = {}
    for part in (board.part(n) for n in names):
        key = probes_of(part) or part.name
        groups.setdefault(key, []).append(part.name)
    return list(groups.values())


def _map(func: Callable, items: Sequence, jobs: int, progress: Progress | None,
         done: int, total: int, label: Callable[[object], str],
         size: Callable[[object], int] = lambda item: 1) -> list:
    """``[func(item) for item in items]`` in order, over ``jobs`` forked
    processes; ``size(item)`` is the item's share of ``total``."""
    if jobs <= 1 or len(items) <= 1 or "fork" not in multiprocessing.get_all_start_methods():
        out = []
        for item in items:
            out.append(func(item))
            done += size(item)
            if progress:
                progress(done, total, label(item))
        return out
    results: list = [None] * len(items)
    context = multiprocessing.get_context("fork")
    with ProcessPoolExecutor(max_workers=min(jobs, len(items)), mp_context=context) as pool:
        # the biggest items first, so no process is left with a long one at the end
        order = sorted(range(len(items)), key=lambda i: -size(items[i]))
        futures = {pool.submit(func, items[i]): i for i in order}
        pending = set(futures)
        while pending:
            finished, pending = wait(pending, return_when=FIRST_COMPLETED)
            for future in sorted(finished, key=lambda f: futures[f]):
                i = futures[future]
                results[i] = future.result()
                done += size(items[i])
                if progress:
                    progress(done, total, label(items[i]))
    return results


def survey(board: Board, profile: Profile | None = None, settings: Settings | None = None,
           progress: Progress | None = None, parts: Sequence[str] | None = None) -> Survey:
    """Survey every part of ``board`` (or only ``parts``, on the whole board);
    see :class:`.result.Survey`."""
    global _STATE
    settings = settings or Settings()
    profile = profile or load_profile()
    if parts is None:
        names = [p.name for p in board.parts]
    else:
        wanted_names = {n.upper() for n in parts}
        names = [p.name for p in board.parts if p.name in wanted_names]
    wanted: dict[tuple[str, ...], None] = {}
    if settings.band_samples:
        for part in (board.part(n) for n in names):
            probes = probes_of(part)
            if probes is not None:
                wanted.setdefault(probes, None)
    pairs = list(wanted)
    total = len(pairs) + len(names)
    bands: dict = {}
    _STATE = (board, profile, settings, bands, RunCache.for_board(board, profile, settings.engine))
    try:
        found = _map(_band_task, pairs, settings.jobs, progress, 0, total,
                     lambda p: "band " + " - ".join(p))  # type: ignore[arg-type]
        bands.update(zip(pairs, found))
        groups = _groups(board, names)
        done = _map(_group_task, groups, settings.jobs, progress, len(pairs), total,
                    lambda g: ", ".join(g), len)  # type: ignore[arg-type]
    finally:
        _STATE = None
    by_name = {r.record["part"]: r for group in done for r in group}
    return Survey.of(board, profile, settings, [by_name[name] for name in names])
