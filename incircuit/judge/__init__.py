"""The judge: can the in-circuit reading judge the part, why, and what to do if not.

:func:`judge` gives a :class:`Judgement` for one part and probe set: the
verdict ("reliable", "predictable", "masked"), the sensitivity, reasons in
plain words, fault detectability, a ranked lift plan and bench-instrument
advice. Every threshold is in :mod:`.thresholds`; docs/verdicts.md explains
the rules.
"""

from .band import HealthyBand, ToleranceBand, part_tolerance
from .verdict import Judgement, LiftOutcome, classify, judge, reliable_window

__all__ = ["HealthyBand", "Judgement", "LiftOutcome", "ToleranceBand", "classify", "judge",
           "part_tolerance", "reliable_window"]
