"""SPICE numbers: scale factors and trailing unit letters, as ngspice reads them.

The rules follow the ngspice user manual, section 2.1.4.2 "Numbers" (table
2.2 "Ngspice scale factors") and 2.1.4.3 "Letters following a number":

* a number is an integer or a decimal, with an optional exponent
  (``1e-14``, ``2.65e3``);
* it may be followed by a scale factor, case-insensitive: T G MEG K MIL M U
  N P F, where ``M`` is *milli* and ``MEG`` is mega;
* letters after the number or after the scale factor are ignored
  (``10V``, ``1kHz``, ``10uF``, ``4.7kOhm``).

Anything else after the number (digits, punctuation) makes the field a bad
number here: ``4K7`` reads as RKM notation only in ngspice's LT
compatibility mode, and we refuse to guess rather than read it as 4 kohm.

>>> parse_number("1MEG"), parse_number("1M"), parse_number("10uF")
(1000000.0, 0.001, 1e-05)
>>> parse_number("4.7kOhm")
4700.0
"""

from __future__ import annotations

import math
import re

__all__ = ["SCALE_FACTORS", "parse_number", "is_number", "NumberError"]

#: Scale factor -> multiplier (ngspice manual, table 2.2). Longest first:
#: ``MEG`` and ``MIL`` must be tried before ``M``.
SCALE_FACTORS: dict[str, float] = {
    "MEG": 1e6,
    "MIL": 25.4e-6,
    "T": 1e12,
    "G": 1e9,
    "K": 1e3,
    "M": 1e-3,
    "U": 1e-6,
    "N": 1e-9,
    "P": 1e-12,
    "F": 1e-15,
}

#: Powers of ten of the decimal factors, so that ``10u`` is computed as the
#: correctly rounded ``10e-6`` rather than ``10 * 1e-6``.
_EXPONENTS = {"MEG": 6, "T": 12, "G": 9, "K": 3, "M": -3, "U": -6, "N": -9, "P": -12, "F": -15}

_NUMBER = re.compile(r"([+-]?(?:\d+\.?\d*|\.\d+))(?:[eE]([+-]?\d+))?")
_LETTERS = re.compile(r"[A-Za-z]*")
_RKM = re.compile(r"\d*[RKMLUNPF]\d", re.IGNORECASE)


class NumberError(ValueError):
    """A field that is not a SPICE number."""


def parse_number(text: str) -> float:
    """The value of a SPICE number field; :class:`NumberError` if it is none.

    >>> parse_number("1MIL")
    2.54e-05
    >>> parse_number("1e3k")
    1000000.0
    """
    m = _NUMBER.match(text)
    if m is None:
        raise NumberError(f"bad number {text!r}")
    rest = text[m.end():]
    if not _LETTERS.fullmatch(rest):
        hint = " (RKM notation is not read: write 4.7k for 4K7)" if _RKM.match(text) else ""
        raise NumberError(f"bad number {text!r}{hint}")
    exp_text = m.group(2) or "0"
    exponent = int(exp_text) if len(exp_text) < 9 else (-(10**6) if exp_text[0] == "-" else 10**6)
    upper = rest.upper()
    suffix = next((s for s in SCALE_FACTORS if upper.startswith(s)), "")
    if suffix in _EXPONENTS:
        exponent += _EXPONENTS[suffix]
    try:
        value = float(f"{m.group(1)}e{exponent}")
    except OverflowError:  # pragma: no cover - float() returns inf instead
        value = math.inf
    if suffix == "MIL":
        value *= SCALE_FACTORS["MIL"]
    if not math.isfinite(value):
        raise NumberError(f"bad number {text!r} (out of range)")
    return value


def is_number(text: str) -> bool:
    """Whether ``text`` is a SPICE number field.

    >>> is_number("10n"), is_number("n10")
    (True, False)
    """
    try:
        parse_number(text)
    except NumberError:
        return False
    return True
