"""The tester model: instrument profile, steps and the identification run.

``load_profile`` reads an instrument profile (TOML); ``run_identification``
drives an engine session through the identification steps and returns the
reading and every step executed. :mod:`incircuit.predict` is the public
entry point on boards.
"""

from __future__ import annotations

from .bench import StepRecord
from .identify import run_identification
from .profile import METHODS, Profile, load_profile, parse_profile

__all__ = ["Profile", "load_profile", "parse_profile", "METHODS", "StepRecord", "run_identification"]
