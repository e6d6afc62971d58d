"""Pin-role files: what each pin of an unmodelled part is, electrically.

A schematic export names chips, connectors, crystals and fuses by a
subcircuit that is never defined. A pin-role file (TOML) says what their
pins are, so that :mod:`.pinmodels` can give each pin its unpowered
electrical model. The format (documented in ``docs/pin-roles.md``)::

    [subckt."MCU-32"]                 # every part using this subcircuit
    default = "bidirectional"         # pins not listed below
    pins = { 4 = "supply", 5 = { role = "ground", name = "GND" } }

    [subckt."DUAL-OPAMP-8"]           # a list gives every pin, in order
    pins = ["output", "input", "input", "ground",
            "input", "input", "output", "supply"]
    names = ["OUTA", "INA-", "INA+", "V-", "INB+", "INB-", "OUTB", "V+"]

    [part.F1]                         # one part, by reference designator
    role = "short"                    # a whole-part role: short, open, switch

Keys of ``subckt`` and ``part`` tables may be glob patterns (``*``, ``?``,
``[...]``), matched case-insensitively.

>>> f = parse_roles('[part.F1]\\nrole = "short"\\n', "x.toml")
>>> f.entries[0].key, f.entries[0].part_role, str(f.entries[0].location)
('F1', 'short', 'x.toml:1')
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, field
from fnmatch import fnmatchcase
from types import MappingProxyType
from typing import Callable, Mapping

from ..errors import ProfileError
from ..model import Location, Part
from .tomllines import KeyLines

__all__ = [
    "PIN_ROLES",
    "PART_ROLES",
    "ALL_ROLES",
    "UNKNOWN",
    "SWITCH_STATES",
    "RoleEntry",
    "RoleFile",
    "parse_roles",
    "load_roles",
]

#: Roles of single pins (see :mod:`.pinmodels` for the model of each).
PIN_ROLES = (
    "supply",
    "ground",
    "input",
    "output",
    "bidirectional",
    "open-drain",
    "analog",
    "no-connect",
    "open",
)
#: Roles of a whole part: ``short`` and ``switch`` need two pins; ``open``
#: (a connector, a crystal) fits any number of pins.
PART_ROLES = ("short", "open", "switch")
ALL_ROLES = tuple(dict.fromkeys(PIN_ROLES + PART_ROLES))
#: The pseudo-role of a pin nobody knows anything about (treated as open).
UNKNOWN = "unknown"
SWITCH_STATES = ("open", "closed")

_ENTRY_KEYS = ("pins", "names", "default", "count", "role", "ohms", "state", "rails_from_nets",
               "also", "note")
_TABLES = ("subckt", "part")


def _fold(name: str) -> str:
    return name.upper().replace("_", "-")


@dataclass(frozen=True)
class RoleEntry:
    """One ``[subckt.KEY]`` or ``[part.KEY]`` table of a pin-role file.

    pins
        Explicit roles by 1-based position.
    count
        The pin count the entry fits (from a ``pins`` list or ``count``);
        None: any count.
    default
        Role of the pins not listed in ``pins``.
    part_role
        ``short``, ``open`` or ``switch`` for the whole part.
    rails_from_nets
        Pins not listed in ``pins`` whose net looks like a supply or ground
        rail take that role (the generic microcontroller set).
    """

    target: str
    key: str
    source: str
    location: Location
    pins: Mapping[int, str] = field(default_factory=dict)
    names: Mapping[int, str] = field(default_factory=dict)
    count: int | None = None
    default: str | None = None
    part_role: str | None = None
    ohms: float | None = None
    state: str | None = None
    rails_from_nets: bool = False
    note: str = ""
    #: Further name patterns this entry matches.
    also: tuple[str, ...] = ()
    #: Line of the key that fixes the pin count (for a wrong-count error).
    count_line: int | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "pins", MappingProxyType(dict(self.pins)))
        object.__setattr__(self, "names", MappingProxyType(dict(self.names)))

    @property
    def patterns(self) -> tuple[str, ...]:
        return (self.key,) + self.also

    @property
    def is_pattern(self) -> bool:
        return any(c in p for p in self.patterns for c in "*?[")

    def matches(self, part: Part) -> bool:
        """Whether this entry names ``part`` (by reference or subcircuit).

        Case, ``-`` and ``_`` are not told apart; a pattern entry with a
        fixed pin count matches only parts with that many pins.
        """
        name = _fold(part.name if self.target == "part" else (part.model or ""))
        if not self.is_pattern:
            return name == _fold(self.key)
        if self.count is not None and self.count != len(part.pins):
            return False
        return any(fnmatchcase(name, _fold(p)) for p in self.patterns)

    def roles_for(self, part: Part, rail: Callable[[str], str | None] = lambda net: None
                  ) -> tuple[tuple[str, ...], tuple[str, ...]]:
        """Per-pin roles and names for ``part``; ProfileError if they do not fit.

        ``rail(net)`` says whether a net looks like a supply or ground rail;
        it is asked only for unlisted pins of a ``rails_from_nets`` entry.
        """
        n = len(part.pins)
        where = self.location.path
        line = self.count_line or self.location.line
        if self.count is not None and self.count != n:
            raise ProfileError(
                f"{self.target} entry {self.key!r} gives {self.count} pins but {part.name} "
                f"has {n}", where, line)
        if self.part_role in ("short", "switch") and n != 2:
            raise ProfileError(
                f"role {self.part_role!r} needs a two-pin part but {part.name} has {n} pins",
                where, self.location.line)
        beyond = [p for p in list(self.pins) + list(self.names) if p > n]
        if beyond:
            raise ProfileError(
                f"{self.target} entry {self.key!r} names pin {max(beyond)} but {part.name} "
                f"has {n} pins", where, line)
        names = tuple(self.names.get(i, "") for i in range(1, n + 1))
        if self.part_role is not None:
            return (self.part_role,) * n, names
        roles: list[str] = []
        for i, net in enumerate(part.pins, start=1):
            role = self.pins.get(i)
            if role is None and self.rails_from_nets:
                role = rail(net)
            if role is None:
                role = self.default
            if role is None:
                raise ProfileError(
                    f"{self.target} entry {self.key!r} gives no role for pin {i} of "
                    f"{part.name} ({n} pins; list it or set default)", where, line)
            roles.append(role)
        return tuple(roles), names


@dataclass(frozen=True)
class RoleFile:
    """A parsed pin-role file: its entries in file order."""

    path: str
    entries: tuple[RoleEntry, ...]


def _fail(message: str, path: str, lines: KeyLines, key: tuple[object, ...]) -> ProfileError:
    return ProfileError(message, path, lines.line_of(key) or 1)


def _role(value: object, allowed: tuple[str, ...], path: str, lines: KeyLines,
          key: tuple[object, ...]) -> str:
    if not isinstance(value, str) or value.lower() not in allowed:
        hint = ""
        if isinstance(value, str) and value.lower() in ("short", "switch"):
            hint = f" (a whole-part role: write role = \"{value.lower()}\")"
        raise _fail(f"unknown pin role {value!r}{hint}; choose from {', '.join(allowed)}",
                    path, lines, key)
    return value.lower()


def _pin_item(value: object, path: str, lines: KeyLines,
              key: tuple[object, ...]) -> tuple[str, str]:
    """A ``pins`` item: a role, or an inline table ``{role = ..., name = ...}``."""
    if isinstance(value, dict):
        extra = set(value) - {"role", "name"}
        if extra:
            raise _fail(f"unknown key {sorted(extra)[0]!r} in a pin (use role, name)", path, lines, key)
        if "role" not in value:
            raise _fail("a pin table needs a role", path, lines, key)
        name = value.get("name", "")
        if not isinstance(name, str):
            raise _fail("a pin name must be a string", path, lines, key)
        return _role(value["role"], PIN_ROLES, path, lines, key), name.upper()
    return _role(value, PIN_ROLES, path, lines, key), ""


def _position(text: str, path: str, lines: KeyLines, key: tuple[object, ...]) -> int:
    if not text.isdigit() or int(text) < 1:
        raise _fail(f"pin {text!r} is not a 1-based pin number", path, lines, key)
    return int(text)


def _entry(target: str, key: str, table: object, path: str, source: str,
           lines: KeyLines) -> RoleEntry:
    here = (target, key)
    if not isinstance(table, dict):
        raise _fail(f"{target}.{key} must be a table", path, lines, here)
    unknown = [k for k in table if k not in _ENTRY_KEYS]
    if unknown:
        raise _fail(f"unknown key {unknown[0]!r} in [{target}.{key}] (known: {', '.join(_ENTRY_KEYS)})",
                    path, lines, here + (unknown[0],))
    pins: dict[int, str] = {}
    names: dict[int, str] = {}
    count: int | None = None
    count_line: int | None = None
    raw = table.get("pins")
    if isinstance(raw, list):
        for i, item in enumerate(raw, start=1):
            pins[i], name = _pin_item(item, path, lines, here + ("pins", i))
            if name:
                names[i] = name
        count, count_line = len(raw), lines.line_of(here + ("pins",))
    elif isinstance(raw, dict):
        for text, item in raw.items():
            pos = _position(text, path, lines, here + ("pins", text))
            pins[pos], name = _pin_item(item, path, lines, here + ("pins", text))
            if name:
                names[pos] = name
    elif raw is not None:
        raise _fail("pins must be a list of roles or a table of pin number = role", path, lines,
                    here + ("pins",))
    raw_names = table.get("names")
    if raw_names is not None:
        if not isinstance(raw_names, list) or not all(isinstance(n, str) for n in raw_names):
            raise _fail("names must be a list of strings", path, lines, here + ("names",))
        if count is not None and len(raw_names) != count:
            raise _fail(f"names gives {len(raw_names)} pins but pins gives {count}", path, lines,
                        here + ("names",))
        for i, name in enumerate(raw_names, start=1):
            if name:
                names.setdefault(i, name.upper())
    if "count" in table:
        value = table["count"]
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            raise _fail("count must be a positive whole number", path, lines, here + ("count",))
        if count is not None and count != value:
            raise _fail(f"count = {value} but pins gives {count}", path, lines, here + ("count",))
        count, count_line = value, lines.line_of(here + ("count",))
    default = None
    if "default" in table:
        default = _role(table["default"], PIN_ROLES, path, lines, here + ("default",))
    part_role = None
    if "role" in table:
        part_role = _role(table["role"], PART_ROLES, path, lines, here + ("role",))
        if pins or default:
            raise _fail("role (a whole-part role) cannot be combined with pins or default",
                        path, lines, here + ("role",))
        if part_role in ("short", "switch"):
            if count not in (None, 2):
                raise _fail(f"role {part_role!r} needs two pins, not {count}", path, lines,
                            here + ("role",))
            count = 2
    ohms = None
    if "ohms" in table:
        value = table["ohms"]
        ok = not isinstance(value, bool) and isinstance(value, (int, float))
        if not ok or not math.isfinite(value) or value <= 0:
            raise _fail("ohms must be a positive number", path, lines, here + ("ohms",))
        if part_role not in ("short", "switch"):
            raise _fail("ohms applies only to role = \"short\" or \"switch\"", path, lines,
                        here + ("ohms",))
        ohms = float(value)
    state = None
    if "state" in table:
        if part_role != "switch":
            raise _fail("state applies only to role = \"switch\"", path, lines, here + ("state",))
        value = table["state"]
        if not isinstance(value, str) or value.lower() not in SWITCH_STATES:
            raise _fail(f"state must be one of {', '.join(SWITCH_STATES)}", path, lines,
                        here + ("state",))
        state = value.lower()
    rails = table.get("rails_from_nets", False)
    if not isinstance(rails, bool):
        raise _fail("rails_from_nets must be true or false", path, lines, here + ("rails_from_nets",))
    also = table.get("also", [])
    if not isinstance(also, list) or not all(isinstance(a, str) and a for a in also):
        raise _fail("also must be a list of name patterns", path, lines, here + ("also",))
    note = table.get("note", "")
    if not isinstance(note, str):
        raise _fail("note must be a string", path, lines, here + ("note",))
    if not pins and default is None and part_role is None and not rails:
        raise _fail(f"[{target}.{key}] gives no roles (set pins, default or role)", path, lines, here)
    return RoleEntry(target, key.upper(), source, Location(path, lines.line_of(here) or 1),
                     pins, names, count, default, part_role, ohms, state, rails, note,
                     tuple(a.upper() for a in also), count_line)


def parse_roles(text: str, path: str = "<text>", source: str | None = None) -> RoleFile:
    """Parse the text of a pin-role file; ProfileError with path and line."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        message = str(error)
        line = None
        marker = message.rfind("(at line ")
        if marker >= 0:
            digits = message[marker + 9:].split(",")[0]
            line = int(digits) if digits.isdigit() else None
            message = message[:marker].strip()
        raise ProfileError(f"not valid TOML: {message}", path, line or 1) from None
    lines = KeyLines(text)
    entries: list[RoleEntry] = []
    for top, tables in data.items():
        if top not in _TABLES:
            raise _fail(f"unknown table {top!r} (use [subckt.NAME] or [part.NAME])", path, lines, (top,))
        if not isinstance(tables, dict):
            raise _fail(f"{top} must be a table of entries", path, lines, (top,))
        for key, table in tables.items():
            entries.append(_entry(top, key, table, path, source or f"file {path}", lines))
    return RoleFile(path, tuple(entries))


def load_roles(path: str) -> RoleFile:
    """Read and parse the pin-role file at ``path``."""
    try:
        with open(path, "rb") as handle:
            raw = handle.read()
    except OSError as error:
        raise ProfileError(f"cannot read pin-role file: {error.strerror}", path) from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as error:
        line = raw[: error.start].count(b"\n") + 1
        raise ProfileError("pin-role file is not UTF-8 text", path, line) from None
    return parse_roles(text, path)
