"""The safety cautions shown wherever the tool gives advice.

One shared constant so every command prints the same words.

>>> len(CAUTIONS) >= 6
True
>>> print(caution_lines()[0])
Safety:
"""

from __future__ import annotations

__all__ = ["CAUTIONS", "caution_lines"]

CAUTIONS: tuple[str, ...] = (
    "Disconnect all power and batteries before connecting any tester.",
    "Discharge capacitors through a suitable resistor and verify with a meter before probing.",
    "Mains and high-voltage equipment (switch-mode supply primaries, flash circuits, motor "
    "drives) can hold a dangerous charge long after unplugging.",
    "A charged capacitor can damage the tester.",
    "Use ESD precautions.",
    "Defer to local electrical codes and licensed practice.",
    "Predictions are aids, not guarantees.",
)


def caution_lines(title: str = "Safety:") -> list[str]:
    """The cautions as text lines under ``title``, one bullet each."""
    return [title, *(f"  - {c}" for c in CAUTIONS)]
