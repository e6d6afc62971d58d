"""Report writers of a board survey: report.html, readings.csv, survey.json.

:func:`write_report` writes the three files into a folder, each atomically
(:mod:`.files`). The writers take the survey as plain data (its
``to_dict()``) plus the waveforms for the plots, so they do not depend on
how the survey was made. Plots are matplotlib SVG (:mod:`.plots`).
"""

from __future__ import annotations

import multiprocessing
import os
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path
from typing import Mapping

from .files import ensure_folder, write_atomic
from .html import render_html
from .plots import trace_svg
from .sheets import CSV_COLUMNS, readings_csv, survey_json

__all__ = ["write_report", "make_plots", "render_html", "readings_csv", "survey_json", "trace_svg",
           "write_atomic", "CSV_COLUMNS", "MAX_PLOTS", "REPORT_FILES"]

#: At most this many parts get a waveform plot (in board order): a plot is
#: about 40 kB of SVG, so a very large board would make a page too heavy to open.
MAX_PLOTS = 300

#: The files a report consists of.
REPORT_FILES = ("report.html", "readings.csv", "survey.json")


_PLOTS: dict = {}  # what forked plot workers inherit: part -> (traces, probes)


def _plot(name: str) -> str:
    trace, probes = _PLOTS[name]
    return trace_svg(trace.get("isolated"), trace.get("in_circuit"), name, probes)


def make_plots(data: Mapping, traces: Mapping[str, Mapping], limit: int = MAX_PLOTS,
               jobs: int = 1) -> tuple[dict[str, str], str]:
    """SVG per part (the first ``limit`` parts with waveforms, over ``jobs``
    forked processes) and a note for the parts left without one."""
    global _PLOTS
    chosen = {}
    note = "" if traces else "no plot: the survey ran without waveforms (--no-plots)"
    for rec in data.get("parts") or []:
        name = str(rec.get("part"))
        if not traces.get(name) or rec.get("status") != "ok":
            continue
        if len(chosen) >= limit:
            note = (f"no plot: only the first {limit} parts get one, to keep the page light "
                    "(see readings.csv and survey.json for every reading)")
            break
        chosen[name] = (traces[name], tuple(rec.get("probes") or ()))
    names = list(chosen)
    _PLOTS = chosen
    try:
        if jobs > 1 and len(names) > 1 and "fork" in multiprocessing.get_all_start_methods():
            context = multiprocessing.get_context("fork")
            with ProcessPoolExecutor(max_workers=min(jobs, len(names)), mp_context=context) as pool:
                svgs = list(pool.map(_plot, names, chunksize=max(1, len(names) // (4 * jobs))))
        else:
            svgs = [_plot(n) for n in names]
    finally:
        _PLOTS = {}
    return dict(zip(names, svgs)), note


def write_report(folder: str | os.PathLike, data: Mapping, traces: Mapping[str, Mapping] | None = None,
                 max_plots: int = MAX_PLOTS, jobs: int = 1) -> dict[str, Path]:
    """Write report.html, readings.csv and survey.json into ``folder`` (created
    if needed; plots drawn over ``jobs`` processes); returns name -> path."""
    out = ensure_folder(folder)
    plots, note = make_plots(data, traces or {}, max_plots, jobs)
    files = {
        "survey.json": survey_json(data),
        "readings.csv": readings_csv(data),
        "report.html": render_html(data, plots, note),
    }
    return {name: write_atomic(out / name, text) for name, text in files.items()}
