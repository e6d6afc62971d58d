"""Roles guessed from pin and net names, only where the name is obvious.

A pin whose name or net is a supply rail (``VCC``, ``VDD``, ``V+``,
``AVDD``, ``+5V``, ``+3V3`` ...) is guessed ``supply``; one on a ground or
negative rail (``GND``, ``VSS``, ``AGND``, ``V-``, ``VEE``, ``-12V``,
``0`` ...) is guessed ``ground`` (the role means the chip's most negative
rail). Nothing else is guessed: every other pin stays ``unknown`` and is
treated as open. Hierarchical prefixes of exported net names (``/power/``)
are ignored.

Rail guesses would give a connector, switch, crystal or fuse on a supply
net the clamp diode of a chip, so they are not made for parts whose
reference designator has one of the class letters in
:data:`NOT_CHIP_DESIGNATORS` (reference designators per IEEE 315 / ASME
Y14.44; the SPICE letter ``X`` in front is skipped): those stay unknown.

>>> rail_role("+3V3"), rail_role("/PSU/AGND"), rail_role("V-"), rail_role("PA3")
('supply', 'ground', 'ground', None)
>>> designator_class("XJ2"), designator_class("U7"), designator_class("X1")
('J', 'U', 'X')
"""

from __future__ import annotations

import re

from ..model import Part
from .roles import UNKNOWN

__all__ = ["SUPPLY_PATTERNS", "GROUND_PATTERNS", "NOT_CHIP_DESIGNATORS", "rail_role",
           "designator_class", "guess_roles"]

#: A name matching one of these (whole name, case-insensitive) is a supply rail.
SUPPLY_PATTERNS = (
    r"[ADP]?V(CC|DD)[ADQ]?(IO)?\d*([_-]\w+)?",  # VCC, VDD, AVDD, DVDD, VDDA, VDDIO, VCC_3V3
    r"VDD[ADQ]?(IO)?\d*",
    r"V\+",
    r"\+\d+(\.\d+)?V\d*",  # +5V, +3.3V, +3V3, +12V
    r"\d+V\d+|\d+(\.\d+)?V",  # 3V3, 5V, 1.8V
)
#: A name matching one of these is a ground or negative rail.
GROUND_PATTERNS = (
    r"[ADPSC]?GND[ADP]?(\d*|[_-]\w+)",  # GND, AGND, DGND, PGND, GNDA, GND_ISO
    r"V(SS|EE)[AD]?(IO)?\d*",  # VSS, VSSA, VEE
    r"V-",
    r"-\d+(\.\d+)?V\d*",  # -5V, -12V
    r"0",
)
#: Designator class letters of parts that are not chips: connectors (J P CN
#: CON), jumpers and test points (JP TP), switches (S SW), crystals (Y XTAL),
#: fuses and filters (F FB FL), batteries (BT), relays (K).
NOT_CHIP_DESIGNATORS = frozenset({"J", "P", "CN", "CON", "CONN", "JP", "TP", "S", "SW", "Y", "XTAL",
                                  "F", "FB", "FL", "BT", "K"})
_SUPPLY = re.compile("|".join(f"(?:{p})" for p in SUPPLY_PATTERNS), re.IGNORECASE)
_GROUND = re.compile("|".join(f"(?:{p})" for p in GROUND_PATTERNS), re.IGNORECASE)


def rail_role(name: str) -> str | None:
    """``"supply"``, ``"ground"`` or None for a pin or net name."""
    if not name:
        return None
    base = name.rstrip("/").rsplit("/", 1)[-1].strip()
    if _GROUND.fullmatch(base):
        return "ground"
    if _SUPPLY.fullmatch(base):
        return "supply"
    return None


def designator_class(name: str) -> str:
    """The leading letters of a reference designator, after a SPICE ``X``."""
    body = name[1:] if len(name) > 2 and name[0] in "Xx" and name[1].isalpha() else name
    m = re.match(r"[A-Za-z]+", body)
    return m.group(0).upper() if m else ""


def guess_roles(part: Part, names: tuple[str, ...] = ()) -> tuple[tuple[str, ...], tuple[str, ...]]:
    """Guessed roles of ``part``'s pins and what each guess rests on.

    ``names`` are pin names when known (a pin name is tried before the net
    name). A part whose designator class is not a chip's gets no guesses. Returns (roles, basis): the role or ``"unknown"`` per pin, and a
    short phrase per pin such as ``"net +5V"`` or ``""`` when not guessed.
    """
    roles: list[str] = []
    basis: list[str] = []
    if designator_class(part.name) in NOT_CHIP_DESIGNATORS:
        n = len(part.pins)
        return (UNKNOWN,) * n, ("",) * n
    for i, net in enumerate(part.pins):
        pin_name = names[i] if i < len(names) else ""
        role = rail_role(pin_name)
        if role is not None:
            roles.append(role)
            basis.append(f"pin name {pin_name}")
            continue
        role = rail_role(net)
        roles.append(role or UNKNOWN)
        basis.append(f"net {net}" if role else "")
    return tuple(roles), tuple(basis)
