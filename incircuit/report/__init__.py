"""Report writers of a board survey: report.html, readings.csv, survey.json.

:func:`write_report` writes the three files into a folder, each atomically
(:mod:`.files`). The writers take the survey as plain data (its
``to_dict()``) plus the waveforms for the plots, so they do not depend on
how the survey was made. Plots are matplotlib SVG (:mod:`.plots`).
"""

from __future__ import annotations

import os
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


def make_plots(data: Mapping, traces: Mapping[str, Mapping], limit: int = MAX_PLOTS) -> tuple[dict[str, str], str]:
    """SVG per part (the first ``limit`` parts with waveforms) and a note for the rest."""
    plots: dict[str, str] = {}
    probes = {r.get("part"): r.get("probes") or () for r in data.get("parts") or []}
    for rec in data.get("parts") or []:
        name = rec.get("part")
        trace = traces.get(name)
        if not trace or rec.get("status") != "ok":
            continue
        if len(plots) >= limit:
            return plots, (f"no plot: only the first {limit} parts get one, to keep the page light "
                           "(survey fewer parts, or see survey.json for the readings)")
        plots[name] = trace_svg(trace.get("isolated"), trace.get("in_circuit"), str(name), probes[name])
    return plots, "no plot: the survey ran without waveforms (--no-plots)" if not traces else ""


def write_report(folder: str | os.PathLike, data: Mapping, traces: Mapping[str, Mapping] | None = None,
                 max_plots: int = MAX_PLOTS) -> dict[str, Path]:
    """Write report.html, readings.csv and survey.json into ``folder`` (created
    if needed); returns name -> path."""
    out = ensure_folder(folder)
    plots, note = make_plots(data, traces or {}, max_plots)
    files = {
        "survey.json": survey_json(data),
        "readings.csv": readings_csv(data),
        "report.html": render_html(data, plots, note),
    }
    return {name: write_atomic(out / name, text) for name, text in files.items()}
