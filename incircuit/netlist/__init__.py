"""SPICE netlist import (ngspice dialect) -> :class:`~incircuit.model.Board`.

The pipeline is lexer (cards with file and line) -> includes (``.include``
and ``.lib`` spliced in, confined to the netlist's folder) -> parser
(scopes, models, parameters) -> flatten (subcircuit calls expanded) ->
board checks. Every user error is a :class:`~incircuit.errors.NetlistError`
naming file and line; everything else worth knowing lands in
``Board.notes``. See docs/netlist.md for the dialect.

>>> b = parse_text("demo\\nR1 in out 4.7k ; tol=1%\\nC1 out 0 100n\\nV1 in 0 5\\n")
>>> [(p.name, p.value) for p in b.parts]
[('R1', 4700.0), ('C1', 1e-07)]
>>> b.part("R1").tolerance.plus, b.part("C1").tolerance.origin
(0.01, 'default')
"""

from __future__ import annotations

import os
from collections import Counter

from ..errors import NetlistError
from ..model import Board, Part
from .flatten import flatten
from .includes import expand, read_netlist_file
from .lexer import Card, read_cards
from .parser import Deck, parse_cards

__all__ = ["load", "parse_text", "MAX_NOTES_PER_KIND"]

#: At most this many notes of one kind (one-pin nets, tied parts, sources);
#: the rest are summed up in one more note.
MAX_NOTES_PER_KIND = 30


def load(path: str, keep_sources: bool = False) -> Board:
    """Import the netlist file at ``path``.

    ``.include`` and ``.lib`` files are read relative to the including file
    and only from inside the folder of ``path``. With ``keep_sources`` each
    V source stays as a 1 mohm short (see :data:`flatten.SOURCE_SHORT_OHMS`);
    I sources are always dropped.
    """
    path = os.fspath(path)
    title, cards = read_netlist_file(path, path, None, has_title=True)
    base = os.path.dirname(os.path.abspath(path))
    return _build(title, cards, path, base, keep_sources, os.path.realpath(path))


def parse_text(text: str, path: str = "<text>", keep_sources: bool = False, base_dir: str | None = None) -> Board:
    """Import netlist text; ``path`` is used in messages and ``Board.path``.

    Includes are read relative to ``base_dir`` and only from inside it;
    without ``base_dir`` any include is an error.
    """
    title, cards = read_cards(text, path, has_title=True)
    return _build(title, cards, path, base_dir, keep_sources, None)


def _build(title: str, cards: list[Card], path: str, base: str | None, keep_sources: bool,
           real: str | None) -> Board:
    notes: list[str] = []
    stack = ((real, ""),) if real else ()
    try:
        cards = expand(cards, base or "", base, notes, stack)
        deck = parse_cards(cards)
        flat = flatten(deck, keep_sources)
    except RecursionError:
        raise NetlistError("netlist nested too deeply to import", path, 1) from None
    if not flat.parts:
        raise NetlistError("empty netlist: no parts (R C L K D Q M J or X) found", path, 1)
    notes.extend(deck.notes)
    notes.extend(_limit(flat.notes))
    notes.extend(_board_checks(flat.parts))
    skipped = _skipped_note(deck)
    if skipped:
        notes.append(skipped)
    return Board(deck.title if deck.title is not None else title, tuple(flat.parts), flat.models,
                 tuple(notes), path)


def _limit(notes: list[str], kind_of=None) -> list[str]:
    """At most MAX_NOTES_PER_KIND notes of one kind.

    ``kind_of(note)`` names the kind; by default the wording after the
    position and the part name, up to the next colon.
    """
    out: list[str] = []
    counts: Counter[str] = Counter()
    for note in notes:
        kind = kind_of(note) if kind_of else note.split(": ", 2)[-1].split(":")[0]
        counts[kind] += 1
        if counts[kind] <= MAX_NOTES_PER_KIND:
            out.append(note)
    for kind, count in counts.items():
        if count > MAX_NOTES_PER_KIND:
            out.append(f"... and {count - MAX_NOTES_PER_KIND} more notes like '{kind}'")
    return out


def _where(part: Part) -> str:
    return f"{part.location}: " if part.location else ""


def _board_checks(parts: list[Part]) -> list[str]:
    tied: list[str] = []
    single: list[str] = []
    pins: Counter[str] = Counter()
    owner: dict[str, Part] = {}
    for part in parts:
        for net in part.pins:
            pins[net] += 1
            owner.setdefault(net, part)
        if len(part.pins) >= 2 and len(set(part.pins)) == 1:
            tied.append(f"{_where(part)}{part.name}: part tied to one net only (all pins on {part.pins[0]})")
    for net, count in pins.items():
        if count == 1:
            part = owner[net]
            single.append(f"{_where(part)}net {net} has one pin only ({part.name})")
    return _limit(tied, lambda n: "part tied to one net only") + _limit(single, lambda n: "net has one pin only")


def _skipped_note(deck: Deck) -> str | None:
    """One warning listing every skipped kind, in order of first appearance."""
    kinds = deck.skipped
    if not kinds:
        return None
    total = sum(count for count, _ in kinds.values())
    first = next(iter(kinds.values()))[1]
    listed = ", ".join(f"{kind} x{count} (first at {card.path}:{card.line})" for kind, (count, card) in kinds.items())
    return (f"{first.path}:{first.line}: warning: {total} card(s) skipped, not read as board parts "
            f"(never simulated or run): {listed}")
