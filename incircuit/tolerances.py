"""Default value tolerances of parts whose netlist line gives none.

One table, :data:`DEFAULTS`. Each row names the kind, the value range it
covers, the band, and where the figure comes from: "common practice" for a
trade rule of thumb, "from memory" for a figure recalled without a source at
hand. The letters are the tolerance codes of IEC 60062 (J = ±5 %,
K = ±10 %, M = ±20 %, Z = -20 %/+80 %).

Semiconductors (D, Q, M, J), couplings (K) and unmodelled parts (X) get no
value tolerance: their spread is in their model parameters.

>>> default_tolerance("R", 10e3).band(10e3)
(9500.0, 10500.0)
>>> default_tolerance("C", 100e-9).plus, default_tolerance("C", 10e-6).plus
(0.1, 0.2)
>>> default_tolerance("D", None) is None
True
"""

from __future__ import annotations

from dataclasses import dataclass

from .model import Tolerance

__all__ = ["ToleranceRule", "DEFAULTS", "default_tolerance"]


@dataclass(frozen=True)
class ToleranceRule:
    kind: str
    #: The rule applies to values in [low, high) in SI units.
    low: float
    high: float
    minus: float
    plus: float
    code: str
    reason: str
    source: str


_INF = float("inf")

DEFAULTS: tuple[ToleranceRule, ...] = (
    ToleranceRule("R", 0.0, _INF, 0.05, 0.05, "J",
                  "general-purpose film and thick-film resistors are sold as ±5 % (E24)",
                  "common practice"),
    ToleranceRule("C", 0.0, 1e-6, 0.10, 0.10, "K",
                  "ceramic (X7R) and film capacitors below 1 uF are commonly ±10 %",
                  "common practice"),
    ToleranceRule("C", 1e-6, _INF, 0.20, 0.20, "M",
                  "1 uF and above is mostly aluminium electrolytic or high-value ceramic, "
                  "specified ±20 %; older electrolytics and Y5V ceramics were -20 %/+80 % (Z)",
                  "from memory"),
    ToleranceRule("L", 0.0, _INF, 0.20, 0.20, "M",
                  "power and filter inductors are commonly specified ±20 %",
                  "common practice"),
)


def default_tolerance(kind: str, value: float | None) -> Tolerance | None:
    """The default tolerance of a part of ``kind`` with ``value`` (SI), or None."""
    if value is None:
        return None
    for rule in DEFAULTS:
        if rule.kind == kind and rule.low <= abs(value) < rule.high:
            return Tolerance(rule.minus, rule.plus, "default")
    return None
