"""Waveform plots for the report: the probe voltages of the identification run,
on the part alone and in circuit, as inline SVG.

Steps last from microseconds to tenths of a second, so each step gets the
same width on the horizontal axis (time runs linearly inside a step); the
step names label the axis. The two runs are drawn one above the other on
the same voltage scale. Output is deterministic: matplotlib's Agg-free SVG
backend with a fixed ``svg.hashsalt``, no date in the metadata, and text
kept as text (``svg.fonttype = none``), so the same traces give the same
bytes.

>>> import numpy as np
>>> run = [{"name": "charge", "duration": 1e-3, "x": np.array([0.0, 0.5, 1.0]),
...         "v": np.array([[0.0, 0.0], [2.0, 0.0], [3.0, 0.0]])}]
>>> svg = trace_svg(run, run, "R1")
>>> svg.startswith("<svg") and svg == trace_svg(run, run, "R1")
True
"""

from __future__ import annotations

import io
import re
from typing import Sequence

import numpy as np

__all__ = ["trace_svg", "PLOT_STYLE", "HASH_SALT"]

#: Fixed salt for the ids matplotlib writes into an SVG.
HASH_SALT = "incircuit-survey"

#: rcParams for every plot.
PLOT_STYLE = {
    "svg.hashsalt": HASH_SALT,
    "svg.fonttype": "none",
    "font.size": 8,
    "font.family": "sans-serif",
    "axes.spines.top": False,
    "axes.spines.right": False,
    "path.simplify": True,
}

_COLOURS = ("#1f5fa8", "#c2541d", "#2e7d32")
_WIDTH_IN = 7.2
#: Steps whose name starts with one of these are drawn without a label (resets).
_QUIET = ("discharge", "initial discharge")
#: Longest step label (characters) under the axis.
_LABEL_CHARS = 24


def _short(name: str) -> str:
    text = re.sub(r"\s*\(.*?\)", "", name).strip()
    return text if len(text) <= _LABEL_CHARS else text[:_LABEL_CHARS - 1] + "\u2026"


def _panel(ax, steps: Sequence[dict] | None, title: str, probes: Sequence[str]) -> None:
    ax.set_title(title, loc="left", fontsize=8, fontweight="bold")
    ax.set_ylabel("volts")
    if not steps:
        ax.text(0.5, 0.5, "no run", ha="center", va="center", transform=ax.transAxes)
        ax.set_xticks([])
        return
    n_probes = max(np.asarray(s["v"]).shape[1] for s in steps)
    for k in range(n_probes):
        xs, ys = [], []
        for i, s in enumerate(steps):
            v = np.asarray(s["v"], dtype=float)
            if v.shape[1] <= k:
                continue
            xs.append(i + np.asarray(s["x"], dtype=float))
            ys.append(v[:, k])
        if xs:
            label = f"probe {k + 1}" + (f" ({probes[k]})" if k < len(probes) else "")
            ax.plot(np.concatenate(xs), np.concatenate(ys), color=_COLOURS[k % 3], lw=1.1,
                    ls=("-", "--", ":")[k % 3], label=label)
    ticks, labels = [], []
    for i, s in enumerate(steps):
        if i % 2:
            ax.axvspan(i, i + 1, color="#f1f1f1", lw=0, zorder=0)
        if not s["name"].startswith(_QUIET):
            ticks.append(i + 0.5)
            labels.append(f"{i + 1} {_short(s['name'])}")
    ax.set_xlim(0, len(steps))
    ax.set_xticks(ticks, labels, rotation=90, fontsize=6)
    ax.tick_params(axis="x", length=0)
    ax.legend(loc="lower right", bbox_to_anchor=(1.0, 1.0), fontsize=6, frameon=False, ncol=n_probes,
              borderaxespad=0.1)


def trace_svg(isolated: Sequence[dict] | None, in_circuit: Sequence[dict] | None, part: str,
              probes: Sequence[str] = ()) -> str:
    """An SVG document (text) with the two runs' probe voltages, step by step."""
    import matplotlib
    from matplotlib.figure import Figure
    from matplotlib.backends.backend_svg import FigureCanvasSVG

    top = max([float(np.nanmax(np.asarray(s["v"], dtype=float))) for run in (isolated, in_circuit)
               for s in (run or ()) if np.asarray(s["v"]).size] or [5.0])
    with matplotlib.rc_context(PLOT_STYLE):
        fig = Figure(figsize=(_WIDTH_IN, 6.2))
        FigureCanvasSVG(fig)
        axes = fig.subplots(2, 1, sharey=True)
        _panel(axes[0], isolated, f"{part} alone", probes)
        _panel(axes[1], in_circuit, f"{part} in circuit", probes)
        for ax in axes:
            ax.set_ylim(-0.1, max(top, 1.0) * 1.08)
            ax.grid(axis="y", color="#dddddd", lw=0.5)
        # fixed margins (a tight layout would draw the figure twice): room for the
        # rotated step names under each panel and the legend above it
        fig.subplots_adjust(left=0.075, right=0.985, top=0.95, bottom=0.19, hspace=0.82)
        buffer = io.StringIO()
        fig.savefig(buffer, format="svg", metadata={"Date": None})
    text = buffer.getvalue()
    return text[text.index("<svg"):]
