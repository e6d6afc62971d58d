"""The unpowered electrical model of each pin role, as circuit elements.

An unpowered chip is a network of junctions: every signal pin has a
protection diode up to the chip's supply pin(s) and one up from its ground
pin(s), plus a few picofarads and a large leakage resistance; the supply
pin sees the ground pin through a clamp diode and the die's own
capacitance and leakage. The models, per role:

``input``, ``output``, ``bidirectional``, ``analog``
    diode pin -> each supply net (anode at the pin); diode each ground net
    -> pin; ``PIN_CAPACITANCE`` and ``PIN_LEAKAGE`` from the pin to the
    first ground net. An output's driver transistors add body diodes in the
    same directions, so an unpowered output looks like an input.
``open-drain``
    only the ground-side diodes, plus the pull-down transistor's body
    diode (same direction), the capacitance and the leakage.
``supply`` (with the chip's ground pins)
    diode each ground net -> each supply net (anode at ground), and
    ``SUPPLY_CAPACITANCE`` and ``SUPPLY_LEAKAGE`` from each supply net to
    the first ground net.
``ground``
    the reference of the others; nothing of its own.
``no-connect``, ``open``, ``unknown``
    nothing.
``short``
    a resistor of ``SHORT_OHMS`` (or the entry's ``ohms``).
``switch``
    that resistor when the switch is closed, nothing when open.

Several pins on the same net share one set of diodes to it, and rails tied
together by a near-zero-ohm part (a ferrite bead between VCC and AVCC)
count once. A signal pin whose net reaches no other part is left out: its
two junctions in series only parallel the chip's own supply clamp, so they
never carry current first (a probe placed on such a free pin itself sees
nothing of the chip). A chip with no supply pin has no supply-side diodes,
one with no ground pin no ground-side parts. Every value and its source is
in :data:`PIN_MODEL_VALUES`.

>>> from incircuit.model import Board, Part
>>> u = Part("U1", "X", ("A", "VCC", "GND"), model="BUF",
...          params={"roles": ("input", "supply", "ground")})
>>> r = Part("R1", "R", ("A", "GND"), 1e3)
>>> sorted(e.name for e in expand_pin_roles(u, Board("t", (u, r))))[:3]
['U1~P1~C', 'U1~P1~DH1', 'U1~P1~DL1']
"""

from __future__ import annotations

from types import MappingProxyType

from ..circuit import UNMODELLED_EXPANDERS, Element
from ..model import Board, Model, Part
from .uncertain import tied_nets

__all__ = [
    "PIN_MODEL_VALUES",
    "PIN_DIODE",
    "SHORT_OHMS",
    "SIGNAL_ROLES",
    "expand_pin_roles",
    "register",
]

#: name -> (value in SI units, unit, source). One place for every number.
PIN_MODEL_VALUES = MappingProxyType({
    "diode_is": (1e-14, "A", "from memory: saturation current of a small on-chip protection junction"),
    "diode_n": (1.0, "1", "from memory: near-ideal junction (Sze, Physics of Semiconductor Devices, ideality ~1)"),
    "diode_cjo": (1e-12, "F", "from memory: zero-bias capacitance of a pin protection diode"),
    "pin_capacitance": (5e-12, "F", "common practice: data-sheet input capacitance is typically 3-10 pF"),
    "pin_leakage": (100e6, "ohm", "from memory: tens of nA leakage at a few volts on an unpowered CMOS pin"),
    "supply_capacitance": (1e-9, "F", "from memory: on-die capacitance between a small chip's rails"),
    "supply_leakage": (1e6, "ohm", "from memory: an unpowered chip draws microamps below one junction drop"),
    "short_ohms": (0.05, "ohm", "common practice: fuse, ferrite bead or zero-ohm link reads a fraction of an ohm"),
})

#: The generic silicon small-signal junction of every pin diode.
PIN_DIODE = Model("~PINDIODE", "D", {
    "is": PIN_MODEL_VALUES["diode_is"][0],
    "n": PIN_MODEL_VALUES["diode_n"][0],
    "cjo": PIN_MODEL_VALUES["diode_cjo"][0],
})
SHORT_OHMS = PIN_MODEL_VALUES["short_ohms"][0]
PIN_CAPACITANCE = PIN_MODEL_VALUES["pin_capacitance"][0]
PIN_LEAKAGE = PIN_MODEL_VALUES["pin_leakage"][0]
SUPPLY_CAPACITANCE = PIN_MODEL_VALUES["supply_capacitance"][0]
SUPPLY_LEAKAGE = PIN_MODEL_VALUES["supply_leakage"][0]

#: Roles with protection diodes to both rails.
SIGNAL_ROLES = ("input", "output", "bidirectional", "analog")


def _diode(name: str, anode: str, cathode: str, part: str) -> Element:
    return Element(name, "D", (anode, cathode), model=PIN_DIODE, part=part)


def _two_pin(part: Part, role: str) -> tuple[Element, ...]:
    closed = role == "short" or part.params.get("switch_state") == "closed"
    if not closed or len(part.pins) != 2 or part.pins[0] == part.pins[1]:
        return ()
    ohms = float(part.params.get("short_ohms") or SHORT_OHMS)  # type: ignore[arg-type]
    return (Element(f"{part.name}~R", "R", part.pins, ohms, part=part.name),)


def _one_per_tie(nets: list[str], board: Board) -> list[str]:
    """``nets`` without those tied to an earlier one (one diode serves a tied group)."""
    kept: list[str] = []
    covered: set[str] = set()
    for net in nets:
        if net not in covered:
            kept.append(net)
            covered |= tied_nets(board, (net,))
    return kept


def _free(net: str, part: Part, board: Board) -> bool:
    """True when no other part touches ``net``."""
    return all(p.name == part.name for p in board.parts_on(net))


def _chip(part: Part, roles: tuple[str, ...], board: Board) -> tuple[Element, ...]:
    name = part.name
    supplies = list(dict.fromkeys(n for n, r in zip(part.pins, roles) if r == "supply"))
    grounds = list(dict.fromkeys(n for n, r in zip(part.pins, roles) if r == "ground"))
    rails = set(supplies) | set(grounds)
    supplies, grounds = _one_per_tie(supplies, board), _one_per_tie(grounds, board)
    out: list[Element] = []
    done: set[str] = set()
    for pin, (net, role) in enumerate(zip(part.pins, roles), start=1):
        if role not in SIGNAL_ROLES and role != "open-drain":
            continue
        if net in done or net in rails or _free(net, part, board):
            continue  # one set of diodes per net; a pin on a rail is the rail; a free pin
        done.add(net)
        tag = f"{name}~P{pin}"
        if role != "open-drain":
            out += [_diode(f"{tag}~DH{i}", net, s, name) for i, s in enumerate(supplies, 1)]
        out += [_diode(f"{tag}~DL{i}", g, net, name) for i, g in enumerate(grounds, 1)]
        if grounds:
            if role == "open-drain":
                out.append(_diode(f"{tag}~DB", grounds[0], net, name))
            out.append(Element(f"{tag}~C", "C", (net, grounds[0]), PIN_CAPACITANCE, part=name))
            out.append(Element(f"{tag}~R", "R", (net, grounds[0]), PIN_LEAKAGE, part=name))
    for i, s in enumerate(supplies, 1):
        out += [_diode(f"{name}~S{i}~D{j}", g, s, name) for j, g in enumerate(grounds, 1) if g != s]
        if grounds and grounds[0] != s:
            out.append(Element(f"{name}~S{i}~C", "C", (s, grounds[0]), SUPPLY_CAPACITANCE, part=name))
            out.append(Element(f"{name}~S{i}~R", "R", (s, grounds[0]), SUPPLY_LEAKAGE, part=name))
    return tuple(out)


def expand_pin_roles(part: Part, board: Board) -> tuple[Element, ...] | None:
    """The elements ``part``'s pin roles imply; None if it carries no roles.

    Roles come from ``part.params["roles"]`` (one per pin), set by
    :func:`incircuit.chips.apply_pin_roles`.
    """
    roles = part.params.get("roles")
    if not roles:
        return None
    roles = tuple(str(r) for r in roles)  # type: ignore[union-attr]
    if roles[0] in ("short", "switch"):
        return _two_pin(part, roles[0])
    return _chip(part, roles, board)


def register() -> None:
    """Add :func:`expand_pin_roles` to ``circuit.UNMODELLED_EXPANDERS`` once."""
    if expand_pin_roles not in UNMODELLED_EXPANDERS:
        UNMODELLED_EXPANDERS.append(expand_pin_roles)
