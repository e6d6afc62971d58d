"""Attach pin roles to a board's unmodelled parts.

Where a part's roles come from, first match wins:

1. ``[part.NAME]`` entries of the user's files, then ``[subckt.NAME]``
   entries; at each of these two levels an exact name beats a pattern, a
   later ``--pins`` file beats an earlier one, and within one file entries
   are tried in file order;
2. the bundled library (:mod:`.library`), by subcircuit name pattern;
3. a guess from pin and net names (:mod:`.guess`): only supply and ground
   pins are guessed, every other pin stays ``unknown`` (open).

The result is carried on each part as ``params``: ``roles`` (one per pin),
``roles_origin`` (``"file <path>"``, ``"library <name>"``, ``"guess"`` or
``"unknown"``), ``roles_entry`` (``"<path>:<line> [subckt.KEY]"``),
``pin_names``, ``roles_basis`` (per pin, what a guess rests on),
``short_ohms`` and ``switch_state`` where they apply.

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("F1", "X", ("A", "B"), model="FUSE-1206"),
...                 Part("U1", "X", ("IN", "+5V", "GND"), model="ODD-CHIP")))
>>> b = apply_pin_roles(b)
>>> b.part("F1").params["roles"], b.part("F1").params["roles_origin"]
(('short', 'short'), 'library interconnect')
>>> b.part("U1").params["roles"], b.part("U1").params["roles_origin"]
(('unknown', 'supply', 'ground'), 'guess')
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Iterable, Mapping

from ..errors import InputError
from ..model import Board, Part
from .guess import guess_roles, rail_role
from .library import library_files
from .roles import SWITCH_STATES, UNKNOWN, RoleEntry, RoleFile, load_roles

__all__ = ["Resolution", "resolve_roles", "apply_pin_roles", "unmodelled_summary"]


@dataclass(frozen=True)
class Resolution:
    """The roles found for one part and where they came from."""

    roles: tuple[str, ...]
    names: tuple[str, ...]
    origin: str
    entry: RoleEntry | None = None
    basis: tuple[str, ...] = ()


def _candidates(user: tuple[RoleFile, ...], library: tuple[RoleFile, ...]) -> list[RoleEntry]:
    """Every entry in the order it is tried."""
    order: list[RoleEntry] = []
    for target in ("part", "subckt"):
        for pattern in (False, True):
            for f in reversed(user):
                order += [e for e in f.entries if e.target == target and e.is_pattern == pattern]
    for pattern in (False, True):
        for f in library:
            order += [e for e in f.entries if e.is_pattern == pattern]
    return order


def _resolve(part: Part, order: list[RoleEntry]) -> Resolution:
    for entry in order:
        if entry.matches(part):
            roles, names = entry.roles_for(part, rail_role)
            return Resolution(roles, names, entry.source, entry)
    known = part.params.get("pin_names") or ()
    names = tuple(str(n).upper() for n in known)  # type: ignore[union-attr]
    roles, basis = guess_roles(part, names)
    origin = "guess" if any(r != UNKNOWN for r in roles) else "unknown"
    return Resolution(roles, names, origin, None, basis)


def resolve_roles(part: Part, files: Iterable[RoleFile] = (), library: bool = True) -> Resolution:
    """The roles of one unmodelled part (see the module docstring for the order)."""
    return _resolve(part, _candidates(tuple(files), library_files() if library else ()))


def _params(part: Part, found: Resolution, state: str | None) -> Mapping[str, object]:
    params = {k: v for k, v in part.params.items()
              if k not in ("roles", "roles_origin", "roles_entry", "roles_basis", "short_ohms",
                           "switch_state")}
    params["roles"] = found.roles
    params["roles_origin"] = found.origin
    if found.entry is not None:
        e = found.entry
        params["roles_entry"] = f"{e.location} [{e.target}.{e.key}]"
        if e.ohms is not None:
            params["short_ohms"] = e.ohms
    if any(found.names):
        params["pin_names"] = found.names
    if any(found.basis):
        params["roles_basis"] = found.basis
    if found.roles and found.roles[0] == "switch":
        params["switch_state"] = state or (found.entry.state if found.entry else None) or "open"
    return params


def apply_pin_roles(board: Board, files: Iterable[str | RoleFile] = (),
                    switches: Mapping[str, str] | None = None, library: bool = True) -> Board:
    """A copy of ``board`` whose unmodelled parts carry their pin roles.

    files
        Pin-role file paths (or parsed files); later ones override earlier.
    switches
        Part name -> ``"open"`` or ``"closed"`` for parts whose role is
        ``switch``; InputError for a part that is absent or not a switch.
    library
        Whether the bundled generic role sets are used.
    """
    parsed = tuple(f if isinstance(f, RoleFile) else load_roles(f) for f in files)
    order = _candidates(parsed, library_files() if library else ())
    wanted = {k.upper(): v.lower() for k, v in (switches or {}).items()}
    for name, state in wanted.items():
        if state not in SWITCH_STATES:
            raise InputError(f"--switch {name}={state}: state must be open or closed")
        if not board.has_part(name):
            raise InputError(f"--switch {name}: the board has no part {name}")
    parts: list[Part] = []
    for part in board.parts:
        if part.kind != "X":
            if part.name in wanted:
                raise InputError(f"--switch {part.name}: not an unmodelled switch (a {part.kind} part)")
            parts.append(part)
            continue
        found = _resolve(part, order)
        if part.name in wanted and (not found.roles or found.roles[0] != "switch"):
            raise InputError(f"--switch {part.name}: its role is not switch "
                             f"({found.origin}); give it role = \"switch\" in a pin-role file")
        parts.append(replace(part, params=_params(part, found, wanted.get(part.name))))
    return replace(board, parts=tuple(parts))


def unmodelled_summary(board: Board) -> list[dict]:
    """One dict per unmodelled part: its roles, pin by pin, and their origin."""
    out = []
    for part in board.parts:
        if part.kind != "X":
            continue
        p = part.params
        roles = tuple(p.get("roles") or (UNKNOWN,) * len(part.pins))  # type: ignore[arg-type]
        names = tuple(p.get("pin_names") or ("",) * len(part.pins))  # type: ignore[arg-type]
        basis = tuple(p.get("roles_basis") or ("",) * len(part.pins))  # type: ignore[arg-type]
        entry = {
            "part": part.name,
            "subckt": part.model,
            "origin": str(p.get("roles_origin", "unknown")),
            "entry": p.get("roles_entry"),
            "pins": [
                {"pin": i, "name": names[i - 1] or None, "net": net, "role": roles[i - 1],
                 "basis": basis[i - 1] or None}
                for i, net in enumerate(part.pins, start=1)
            ],
        }
        if p.get("switch_state"):
            entry["switch"] = p["switch_state"]
        out.append(entry)
    return out
