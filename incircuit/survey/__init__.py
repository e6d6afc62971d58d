"""Whole-board survey: which parts a repair shop can check in place, and what would help.

:func:`survey` predicts and judges every part of a board (in parallel
processes with ``Settings(jobs=N)``) and returns a :class:`Survey`: one
record per part in board order (the prediction merged with the judgement
and the healthy band), the fault coverage, counts per verdict, remedies for
the masked parts (:mod:`.remedy`) and the waveforms for the plots.
:mod:`.whatif` surveys a changed board against the original. The report
writers are in :mod:`incircuit.report`; the layout is in docs/survey.md.
"""

from .remedy import REMEDY_KINDS, REMEDY_TITLES, remedy_for
from .result import SCHEMA, Survey, coverage_of
from .run import survey
from .settings import DEFAULT_DEPTH, DEPTHS, STANDARD_SAMPLES, Settings
from .summary import summary_lines
from .whatif import Change, apply_changes, compare, parse_changes

__all__ = [
    "survey", "Survey", "Settings", "DEPTHS", "DEFAULT_DEPTH", "STANDARD_SAMPLES", "SCHEMA",
    "coverage_of", "remedy_for", "REMEDY_KINDS", "REMEDY_TITLES", "summary_lines",
    "Change", "parse_changes", "apply_changes", "compare",
]
