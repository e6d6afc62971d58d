"""Numbers for people: SI-prefixed formatting of values in reports and messages.

>>> format_value(4700.0, "ohm")
'4.7 kohm'
>>> format_value(2.2e-7, "F")
'220 nF'
>>> format_value(0.6123, "V")
'612 mV'
>>> format_value(None, "F")
'-'
"""

from __future__ import annotations

import math

__all__ = ["format_value", "SI_PREFIXES"]

#: Exponent of ten -> prefix used when printing.
SI_PREFIXES = {12: "T", 9: "G", 6: "M", 3: "k", 0: "", -3: "m", -6: "u", -9: "n", -12: "p", -15: "f"}


def format_value(value: float | None, unit: str | None = "", digits: int = 3) -> str:
    """``value`` with an SI prefix and ``digits`` significant digits."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "-"
    unit = unit or ""
    if unit == "1":
        unit = ""
    if value == 0 or not math.isfinite(value):
        return f"{value:g} {unit}".strip()
    exp3 = int(math.floor(math.log10(abs(value)) / 3.0)) * 3
    exp3 = max(min(exp3, 12), -15)
    scaled = value / 10.0**exp3
    text = f"{scaled:.{digits}g}"
    if "e" in text:  # rounding carried into the next prefix, e.g. 999.97 -> 1e+03
        exp3 = min(exp3 + 3, 12)
        text = f"{value / 10.0**exp3:.{digits}g}"
    return f"{text} {SI_PREFIXES[exp3]}{unit}".strip()
