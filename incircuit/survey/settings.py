"""How deep a survey looks: the healthy band each part is judged against.

A survey judges every part of a board; the costly piece is the healthy band
the fault readings are compared with. Three depths trade accuracy for time:

========  ==================================================================
quick     the judge's tolerance band: the in-circuit reading with the part
          itself at both ends of its tolerance, widened by the tester's
          accuracy (two runs per part; every other part stays nominal)
standard  a Monte Carlo band over every part's tolerance (see
          :mod:`incircuit.bands`) with :data:`STANDARD_SAMPLES` samples per
          probed pair of nets; its 0.5/99.5 % limits are close to the
          smallest and largest sample, so the band is a little narrow
full      the same with :data:`incircuit.bands.SURVEY_SAMPLES` samples
========  ==================================================================

Parts probed on the same nets share one band, so a board with many parts
on a few rails costs far fewer bands than parts.

>>> Settings(depth="full").band_samples
100
>>> Settings(depth="quick").band_samples
0
>>> Settings(depth="standard", samples=12).band_samples
12
"""

from __future__ import annotations

from dataclasses import dataclass

from ..bands import DEFAULT_SEED, SURVEY_SAMPLES
from ..errors import InputError

__all__ = ["Settings", "DEPTHS", "DEFAULT_DEPTH", "STANDARD_SAMPLES", "TRACE_POINTS"]

#: Monte Carlo samples per probed pair at depth "standard".
STANDARD_SAMPLES = 24

#: Depth -> Monte Carlo samples per probed pair (0: the judge's tolerance band).
DEPTHS = {"quick": 0, "standard": STANDARD_SAMPLES, "full": SURVEY_SAMPLES}

#: The depth used when none is asked for.
DEFAULT_DEPTH = "standard"

#: Samples per identification step kept for the waveform plots.
TRACE_POINTS = 16


@dataclass(frozen=True)
class Settings:
    """Everything besides the board and the tester profile that shapes a survey.

    ``samples`` overrides the depth's Monte Carlo sample count (None: the
    depth's own); ``jobs`` is the number of processes; ``advice`` False
    leaves out the bench-instrument advice.
    """

    engine: str = "analytic"
    depth: str = DEFAULT_DEPTH
    jobs: int = 1
    seed: int = DEFAULT_SEED
    plots: bool = True
    samples: int | None = None
    #: Bench-instrument advice per part (a nodal analysis of the whole board
    #: per instrument setting: costly on large boards).
    advice: bool = True

    def __post_init__(self) -> None:
        if self.depth not in DEPTHS:
            raise InputError(f"unknown survey depth {self.depth!r} (choose from {', '.join(DEPTHS)})")
        if self.jobs < 1:
            raise InputError(f"--jobs {self.jobs}: give at least 1")
        if self.samples is not None and self.samples != 0 and self.samples < 2:
            raise InputError(f"--samples {self.samples}: give 0 (tolerance band) or at least 2")

    @property
    def band_samples(self) -> int:
        """Monte Carlo samples per probed pair (0: the tolerance band)."""
        return self.samples if self.samples is not None else DEPTHS[self.depth]

    def describe(self) -> str:
        """One line, e.g. ``"standard (Monte Carlo band, 24 samples per probed pair)"``."""
        if self.band_samples == 0:
            text = f"{self.depth} (tolerance band of each part, no Monte Carlo"
        else:
            text = f"{self.depth} (Monte Carlo band, {self.band_samples} samples per probed pair"
        return text + ("" if self.advice else "; no bench-instrument advice") + ")"
