"""Cards -> a deck: elements, ``.model`` and ``.param`` cards, subcircuit definitions.

Nothing is evaluated here: values may depend on subcircuit parameters, so
the flattener evaluates them per instance. This module only sorts cards
into their scopes (the top level or a ``.subckt`` ... ``.ends`` body, see
ngspice user manual 2.5 ".SUBCKT Subcircuits"), keeps ``.if`` blocks
(2.13 ".IF Condition-Controlled Netlist") and records every card that does
not describe a board part (analyses, output and control cards, sources with
behaviour, transmission lines, XSPICE devices) as skipped, by kind.

>>> from incircuit.netlist.lexer import read_cards
>>> _, cards = read_cards("t\\n.subckt div a b\\nR1 a b 1k\\n.ends\\nX1 1 2 div\\n.tran 1n 1u\\n", "x")
>>> deck = parse_cards(cards)
>>> sorted(deck.body.subckts), [e.fields[0] for e in deck.body.items], sorted(deck.skipped)
(['DIV'], ['X1'], ['.tran'])
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from .lexer import Card, split_fields

__all__ = ["Element", "ModelCard", "ParamCard", "IfBlock", "Subckt", "Body", "Deck", "parse_cards", "ELEMENT_KINDS"]

#: Element letters that become parts (R C L K D Q M J), subcircuit calls (X)
#: and independent sources (V I), ngspice manual table 2.1.
ELEMENT_KINDS = frozenset("RCLKDQMJXVI")

#: Element letters that describe no part of a passive board, with the
#: manual's name (table 2.1 "ngspice element types").
SKIPPED_ELEMENTS = {
    "A": "A (XSPICE code model)",
    "B": "B (behavioural source)",
    "E": "E (voltage-controlled voltage source)",
    "F": "F (current-controlled current source)",
    "G": "G (voltage-controlled current source)",
    "H": "H (current-controlled voltage source)",
    "N": "N (numerical device)",
    "O": "O (lossy transmission line)",
    "P": "P (coupled multiconductor line)",
    "S": "S (voltage-controlled switch)",
    "T": "T (lossless transmission line)",
    "U": "U (distributed RC line or digital block)",
    "W": "W (current-controlled switch)",
    "Y": "Y (lossy transmission line)",
    "Z": "Z (MESFET)",
}


@dataclass(eq=False)
class Element:
    card: Card
    fields: list[str]

    @property
    def letter(self) -> str:
        return self.fields[0][0].upper()


@dataclass(eq=False)
class ModelCard:
    name: str
    type: str
    fields: list[str]  # after the type
    card: Card


@dataclass(eq=False)
class ParamCard:
    assignments: list[tuple[str, str]]  # (lower-case name, expression text)
    card: Card


@dataclass(eq=False)
class IfBlock:
    #: (condition text or None for .else, items) in order.
    branches: list[tuple[str | None, list]]
    card: Card


@dataclass(eq=False)
class Body:
    items: list = field(default_factory=list)  # Element | ModelCard | ParamCard | IfBlock
    subckts: dict[str, "Subckt"] = field(default_factory=dict)


@dataclass(eq=False)
class Subckt:
    name: str
    pins: tuple[str, ...]
    defaults: list[tuple[str, str]]  # (lower-case name, value text)
    body: Body
    card: Card


@dataclass(eq=False)
class Deck:
    title: str | None = None  # from a .title card
    body: Body = field(default_factory=Body)
    globals: set[str] = field(default_factory=set)
    #: kind -> (count, first card)
    skipped: dict[str, tuple[int, Card]] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)

    def skip(self, kind: str, card: Card) -> None:
        count, first = self.skipped.get(kind, (0, card))
        self.skipped[kind] = (count + 1, first)


_ASSIGN = re.compile(r"([^\W\d]\w*)\s*=(?!=)")


def split_assignments(text: str, card: Card) -> list[tuple[str, str]]:
    """``a=1 b={a*2} c = a + 1`` -> [(name, expression text)], names lower-case."""
    starts: list[re.Match] = []
    depth = 0
    quote = ""
    i = 0
    while i < len(text):
        c = text[i]
        if quote:
            quote = "" if c == quote else quote
        elif c in "'\"":
            quote = c
        elif c in "{(":
            depth += 1
        elif c in "})":
            depth -= 1
        elif depth == 0 and (i == 0 or text[i - 1] in " \t,") and (c.isalpha() or c == "_"):
            m = _ASSIGN.match(text, i)
            if m and (not starts or text[starts[-1].end():i].strip()):
                starts.append(m)
                i = m.end()
                continue
        i += 1
    if not starts or text[:starts[0].start()].strip(" \t,"):
        raise card.error(f"expected name=value, found {text.strip()[:40]!r}")
    out = []
    for m, nxt in zip(starts, starts[1:] + [None]):
        value = text[m.end():nxt.start() if nxt else len(text)].strip().rstrip(",").strip()
        if not value:
            raise card.error(f"parameter {m.group(1)} has no value")
        out.append((m.group(1).lower(), value))
    return out


def _keyword(card: Card) -> str:
    return card.text.split(None, 1)[0].lower()


def _subckt(card: Card) -> Subckt:
    fields = split_fields(card)
    if len(fields) < 2 or fields[1] == "=":
        raise card.error(".subckt card without a name")
    name = fields[1].upper()
    pins: list[str] = []
    i = 2
    while i < len(fields) and fields[i].lower() != "params:" and not (i + 1 < len(fields) and fields[i + 1] == "="):
        if fields[i].lower().startswith("params:"):
            fields[i] = fields[i][7:]
            break
        pins.append(fields[i].upper())
        i += 1
    if i < len(fields) and fields[i].lower() == "params:":
        i += 1
    defaults = _pairs(fields[i:], card)
    if "0" in pins:
        raise card.error(f"subcircuit {name}: a pin cannot be node 0")
    if len(set(pins)) != len(pins):
        raise card.error(f"subcircuit {name}: a pin is named twice")
    return Subckt(name, tuple(pins), defaults, Body(), card)


def _pairs(fields: list[str], card: Card) -> list[tuple[str, str]]:
    """``name = value`` triples of fields -> [(lower-case name, value text)]."""
    out = []
    i = 0
    while i < len(fields):
        if i + 2 < len(fields) and fields[i + 1] == "=" and fields[i] != "=":
            out.append((fields[i].lower(), fields[i + 2]))
            i += 3
        else:
            raise card.error(f"expected name=value, found {fields[i]!r}")
    return out


def _model(card: Card) -> ModelCard:
    fields = split_fields(card)
    if len(fields) < 3 or "=" in fields[1:3]:
        raise card.error(".model card needs a name and a type")
    return ModelCard(fields[1].upper(), fields[2].upper(), fields[3:], card)


def parse_cards(cards: list[Card]) -> Deck:
    """Sort the cards of a whole (include-expanded) netlist into a :class:`Deck`."""
    deck = Deck()
    # stack of open containers: (Body to add to, Subckt or IfBlock or None)
    bodies: list[tuple[list, Subckt | IfBlock | None]] = [(deck.body.items, None)]
    subckts: list[Subckt] = []
    i = 0
    n = len(cards)
    while i < n:
        card = cards[i]
        i += 1
        items, owner = bodies[-1]
        head = card.text[0]
        if head == ".":
            key = _keyword(card)
            if key == ".control":
                while i < n and _keyword(cards[i]) != ".endc":
                    i += 1
                if i >= n:
                    deck.notes.append(f"{card.path}:{card.line}: .control without .endc: "
                                      "the rest of the netlist is skipped")
                i += 1
                deck.skip(".control block", card)
            elif key == ".model":
                items.append(_model(card))
            elif key == ".param":
                if isinstance(owner, IfBlock):
                    raise card.error(".param is not allowed inside .if (ngspice manual 2.13)")
                rest = card.text.split(None, 1)
                items.append(ParamCard(split_assignments(rest[1] if len(rest) > 1 else "", card), card))
            elif key == ".subckt":
                if isinstance(owner, IfBlock):
                    raise card.error(".subckt is not allowed inside .if (ngspice manual 2.13)")
                sub = _subckt(card)
                scope = subckts[-1].body.subckts if subckts else deck.body.subckts
                if sub.name in scope:
                    deck.notes.append(f"{card.path}:{card.line}: subcircuit {sub.name} defined again; "
                                      "the later definition is used")
                scope[sub.name] = sub
                subckts.append(sub)
                bodies.append((sub.body.items, sub))
            elif key == ".ends":
                if isinstance(owner, IfBlock):
                    raise owner.card.error(".if without .endif")
                if not subckts:
                    raise card.error(".ends without .subckt")
                words = card.text.split()
                if len(words) > 1 and words[1].upper() != subckts[-1].name:
                    raise card.error(f".ends {words[1]} does not close the open .subckt {subckts[-1].name}")
                subckts.pop()
                bodies.pop()
            elif key == ".if":
                block = IfBlock([(card.text.split(None, 1)[1] if len(card.text.split()) > 1 else "", [])], card)
                items.append(block)
                bodies.append((block.branches[0][1], block))
            elif key in (".elseif", ".else"):
                if not isinstance(owner, IfBlock) or owner.branches[-1][0] is None:
                    raise card.error(f"{key} without .if")
                cond = None if key == ".else" else (card.text.split(None, 1)[1] if len(card.text.split()) > 1 else "")
                owner.branches.append((cond, []))
                bodies[-1] = (owner.branches[-1][1], owner)
            elif key == ".endif":
                if not isinstance(owner, IfBlock):
                    raise card.error(".endif without .if")
                bodies.pop()
            elif key == ".global":
                deck.globals.update(w.upper() for w in card.text.split()[1:])
            elif key == ".title":
                deck.title = card.text.split(None, 1)[1].strip() if len(card.text.split()) > 1 else ""
            elif key == ".endc":
                continue
            else:
                deck.skip(key, card)
            continue
        letter = head.upper()
        if not ("A" <= letter <= "Z"):
            raise card.error(f"unknown element letter {head!r} in {card.text.split()[0][:20]!r}")
        if letter in SKIPPED_ELEMENTS:
            deck.skip(SKIPPED_ELEMENTS[letter], card)
            continue
        items.append(Element(card, split_fields(card)))
    if len(bodies) > 1:
        owner = bodies[-1][1]
        if isinstance(owner, IfBlock):
            raise owner.card.error(".if without .endif")
        raise owner.card.error(f".subckt {owner.name} without .ends")
    return deck
