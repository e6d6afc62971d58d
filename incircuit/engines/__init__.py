"""Simulation engines behind one interface (see :mod:`.base`).

``get_engine("analytic")`` is the fast built-in engine; ``get_engine("ngspice")``
runs ngspice through PySpice and is imported only when asked for.
"""

from __future__ import annotations

from importlib import import_module

from ..errors import InputError
from .base import Drive, Engine, Session, Source, StepResult, Watch

__all__ = ["ENGINES", "get_engine", "Drive", "Engine", "Session", "Source", "StepResult", "Watch"]

#: Engine name -> module that defines ``ENGINE``.
ENGINES = {"analytic": ".analytic", "ngspice": ".ngspice"}


def get_engine(name: str) -> Engine:
    """The engine called ``name``; InputError for an unknown name."""
    if name not in ENGINES:
        raise InputError(f"unknown engine {name!r} (choose from {', '.join(ENGINES)})")
    return import_module(ENGINES[name], __package__).ENGINE
