"""Subcircuit expansion: a :class:`Deck` -> flat parts, models and notes.

Follows ngspice user manual 2.5 ".SUBCKT Subcircuits" and 2.9 ".PARAM
Parametric netlists": each ``X`` call copies the subcircuit body with
hierarchical names, ``X3.R2`` for the part ``R2`` of call ``X3`` and
``X3.N1`` for its internal net ``N1`` (nested: ``X1.X2.R5``). Node ``0``,
``GND`` (read as ``0``, manual 2.1.4.5) and ``.global`` nets are shared by
all levels. Models and subcircuits defined inside a subcircuit are local
to it; a local model becomes a board model named after the call
(``X1.DMOD``). Parameters: ``.param`` at the top level is global; the
defaults on the ``.subckt`` line, overridden by the call's ``name=value``
pairs, and ``.param`` cards in the body are local to each call.

An ``X`` whose subcircuit is not defined becomes an unmodelled part of kind
``X``. V and I sources are removed (the board is unpowered), or with
``keep_sources`` each V source becomes a short of :data:`SOURCE_SHORT_OHMS`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..errors import NetlistError
from ..model import Location, Model, Part
from .elements import Behavioural, build_part, split_element
from .expressions import ExpressionError, evaluate
from .lexer import Card
from .numbers import NumberError, is_number, parse_number
from .parser import Body, Deck, Element, IfBlock, ModelCard, ParamCard, Subckt, SKIPPED_ELEMENTS

__all__ = ["flatten", "Flat", "SOURCE_SHORT_OHMS", "MAX_PARTS", "MAX_DEPTH"]

#: Resistance of the short that replaces a kept V source: 1 mohm, of the
#: order of a bench supply's or a battery's output resistance (from memory),
#: small enough to act as a tie and large enough for a well-conditioned
#: matrix.
SOURCE_SHORT_OHMS = 1e-3
#: A netlist that expands to more parts than this is refused.
MAX_PARTS = 200_000
#: Deepest subcircuit nesting.
MAX_DEPTH = 50

#: Names every expression knows: ``temper``, the circuit temperature in
#: degrees Celsius, at ngspice's default of 27 (manual 15.1.1, option TEMP).
BUILTIN_PARAMS = {"temper": 27.0}

#: Model types kept on the board (manual table 2.3); VDMOS is read as NMOS/PMOS.
BOARD_MODEL_TYPES = ("D", "NPN", "PNP", "NMOS", "PMOS", "NJF", "PJF")
VALUE_MODEL_TYPES = ("R", "C", "L")


@dataclass
class Flat:
    parts: list[Part] = field(default_factory=list)
    models: dict[str, Model] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)
    first_seen: dict[str, Card] = field(default_factory=dict)


class _Context:
    """State shared by every level of one flattening."""

    def __init__(self, deck: Deck, keep_sources: bool):
        self.deck = deck
        self.keep_sources = keep_sources
        self.flat = Flat()
        self.gnd_noted = False
        self.skipped_cards: set[int] = set()

    def skip(self, kind: str, card: Card) -> None:
        """Count a skipped card once, however many calls copy it."""
        if id(card) not in self.skipped_cards:
            self.skipped_cards.add(id(card))
            self.deck.skip(kind, card)

    def add(self, part: Part, card: Card) -> None:
        if part.name in self.flat.first_seen:
            first = self.flat.first_seen[part.name]
            raise card.error(f"duplicate part name {part.name} (first at {first.path}:{first.line})")
        if len(self.flat.parts) >= MAX_PARTS:
            raise card.error(f"the netlist expands to more than {MAX_PARTS} parts")
        self.flat.first_seen[part.name] = card
        self.flat.parts.append(part)

    def note(self, card: Card, text: str) -> None:
        self.flat.notes.append(f"{card.path}:{card.line}: {text}")


class _Level:
    """One scope: the top level or one subcircuit call."""

    def __init__(self, ctx: _Context, prefix: str, pins: dict[str, str], params: dict[str, float],
                 failed: dict[str, str], models: dict[str, tuple[str, Model]],
                 subckts: dict[str, Subckt], stack: tuple[Subckt, ...]):
        self.ctx = ctx
        self.prefix = prefix
        self.pins = pins
        self.params = params
        self.failed = failed
        self.models = models
        self.subckts = subckts
        self.stack = stack

    # -- the Scope protocol of elements.py ---------------------------------
    def value(self, text: str, card: Card) -> float:
        if text.startswith(("{", "'")):
            return self.evaluate(text, card)
        try:
            return parse_number(text)
        except NumberError as err:
            hint = f" (a parameter needs braces: {{{text}}})" if text.lower() in self.params else ""
            raise card.error(f"{err}{hint}") from None

    def evaluate(self, text: str, card: Card, logic: bool = False) -> float:
        try:
            return evaluate(text, self.params, logic)
        except ExpressionError as err:
            message = str(err)
            for name, reason in self.failed.items():
                if message == f"undefined parameter {name!r}":
                    raise card.error(f"parameter {name} has no value ({reason})") from None
            raise card.error(message) from None

    def net(self, name: str) -> str:
        key = name.upper()
        if key == "GND":
            if not self.ctx.gnd_noted:
                self.ctx.gnd_noted = True
                self.ctx.flat.notes.append("net GND is the ground node 0 (ngspice manual 2.1.4.5)")
            return "0"
        if key == "0" or key in self.ctx.deck.globals:
            return key
        if key in self.pins:
            return self.pins[key]
        return self.prefix + key

    def part_name(self, name: str) -> str:
        return self.prefix + name.upper()

    def model(self, name: str) -> tuple[str, Model] | None:
        return self.models.get(name.upper())

    def bins(self, name: str) -> list[tuple[str, Model]]:
        head = name.upper() + "."
        found = [(k, v) for k, v in self.models.items() if k.startswith(head) and k[len(head):].isdigit()]
        return [v for _, v in sorted(found, key=lambda kv: int(kv[0][len(head):]))]

    def note(self, card: Card, text: str) -> None:
        self.ctx.note(card, text)


def _param_value(level: _Level, text: str, card: Card) -> float:
    """A parameter value: a number, or an expression with or without braces."""
    if is_number(text):
        return parse_number(text)
    return level.evaluate(text, card)


def _run_params(level: _Level, card: ParamCard) -> None:
    for name, text in card.assignments:
        try:
            level.params[name] = _param_value(level, text, card.card)
            level.failed.pop(name, None)
        except NetlistError as err:
            level.failed[name] = err.message  # reported when the parameter is used
            level.params.pop(name, None)


def _active(level: _Level, items: list) -> list:
    """Items with ``.if`` blocks resolved (manual 2.13)."""
    out = []
    for item in items:
        if not isinstance(item, IfBlock):
            out.append(item)
            continue
        for cond, branch in item.branches:
            if cond is None or level.evaluate(cond, item.card, logic=True):
                out.extend(_active(level, branch))
                break
    return out


def _model(level: _Level, mc: ModelCard, board_name: str) -> Model:
    """A Model from a card (of any type; the caller keeps the board's types)."""
    ctx = level.ctx
    mtype = mc.type
    params: dict[str, float] = {}
    fields = mc.fields
    i = 0
    while i < len(fields):
        key = fields[i]
        if i + 1 < len(fields) and fields[i + 1] == "=":
            if i + 2 >= len(fields):
                raise mc.card.error(f"model {mc.name}: parameter {key} has no value")
            text = fields[i + 2]
            i += 3
            if text.startswith(("{", "'")):
                params[key.lower()] = level.evaluate(text, mc.card)
            elif is_number(text):
                params[key.lower()] = parse_number(text)
            else:
                ctx.note(mc.card, f"model {mc.name}: parameter {key.lower()}={text} is not a number: ignored")
        elif key == "=":
            raise mc.card.error(f"model {mc.name}: misplaced '='")
        else:
            if not is_number(key):
                params[key.lower()] = 1.0  # a flag such as pchan
            i += 1
    if mtype == "VDMOS":
        mtype = "PMOS" if params.get("pchan") else "NMOS"
        params["vdmos"] = 1.0
        ctx.note(mc.card, f"model {mc.name}: VDMOS read as a {mtype} with its bulk on the source; "
                 "its body diode is not modelled")
    return Model(board_name, mtype, params, Location(mc.card.path, mc.card.line))


def _source(level: _Level, el: Element) -> None:
    ctx = level.ctx
    card = el.card
    name = level.part_name(el.fields[0])
    ef = split_element(el.fields, card)
    if len(ef.positional) < 2:
        raise card.error(f"wrong pin count: {name} needs 2 nodes")
    rest = [f.lower() for f in ef.positional[2:]]
    zero = not ef.keywords and rest in ([], ["0"], ["dc", "0"])
    if el.letter == "V" and ctx.keep_sources:
        part = Part(name, "R", (level.net(ef.positional[0]), level.net(ef.positional[1])), SOURCE_SHORT_OHMS,
                    params={"source": "V"}, location=Location(card.path, card.line))
        ctx.add(part, card)
        level.note(card, f"{name}: voltage source kept as a {SOURCE_SHORT_OHMS * 1e3:g} mohm short")
    elif el.letter == "V":
        hint = " it was a 0 V source (a current probe?): keep_sources keeps it as a short" if zero else ""
        level.note(card, f"{name}: voltage source removed: the board is unpowered{';' if hint else ''}{hint}")
    else:
        level.note(card, f"{name}: current source removed: the board is unpowered")


def _call(level: _Level, el: Element) -> None:
    ctx = level.ctx
    card = el.card
    name = level.part_name(el.fields[0])
    ef = split_element(el.fields, card)
    if len(ef.positional) < 2:
        raise card.error(f"wrong pin count: {name} needs at least one node and a subcircuit name")
    sub_name = ef.positional[-1].upper()
    nets = [level.net(n) for n in ef.positional[:-1]]
    overrides = {k: _param_value(level, v[0], card) for k, v in ef.keywords.items()}
    sub = level.subckts.get(sub_name)
    if sub is None:
        params = dict(overrides)
        params.update({f: True for f in ef.flags})
        ctx.add(Part(name, "X", tuple(nets), None, sub_name, params, None, Location(card.path, card.line)), card)
        level.note(card, f"{name}: subcircuit {sub_name} not defined: unmodelled part")
        return
    if len(nets) != len(sub.pins):
        raise card.error(f"wrong pin count: {name} gives {len(nets)} nodes, subcircuit {sub_name} has "
                         f"{len(sub.pins)} pins (defined at {sub.card.path}:{sub.card.line})")
    if any(s is sub for s in level.stack):
        start = next(i for i, s in enumerate(level.stack) if s is sub)
        chain = " -> ".join(s.name for s in level.stack[start:] + (sub,))
        raise card.error(f"subcircuit recursion: {chain}")
    if len(level.stack) >= MAX_DEPTH:
        raise card.error(f"subcircuits nested deeper than {MAX_DEPTH} levels")
    known = {k for k, _ in sub.defaults}
    for key in overrides:
        if key not in known:
            level.note(card, f"{name}: parameter {key} is not on the .subckt line of {sub_name}: set anyway")
    params = dict(level.params)
    params.update({k: v for k, v in overrides.items() if k not in known})
    failed = dict(level.failed)
    inner = _Level(ctx, name + ".", dict(zip(sub.pins, nets)), params, failed, level.models,
                   level.subckts, level.stack + (sub,))
    for key, text in sub.defaults:
        params[key] = overrides[key] if key in overrides else _param_value(inner, text, sub.card)
        failed.pop(key, None)
    _expand(inner, sub.body)


def _expand(level: _Level, body: Body) -> None:
    ctx = level.ctx
    local = dict(level.subckts)
    local.update(body.subckts)
    level.subckts = local
    for item in body.items:
        if isinstance(item, ParamCard):
            _run_params(level, item)
    items = _active(level, body.items)
    models = dict(level.models)
    for item in items:
        if isinstance(item, ModelCard):
            board_name = level.prefix + item.name
            model = _model(level, item, board_name)
            if model.type not in BOARD_MODEL_TYPES and model.type not in VALUE_MODEL_TYPES:
                ctx.skip(f".model {model.type}", item.card)
            if item.name in models and models[item.name][0] == board_name:
                level.note(item.card, f"model {item.name} defined again; the later card is used")
            models[item.name] = (board_name, model)
            if model.type in BOARD_MODEL_TYPES:
                ctx.flat.models[board_name] = model
    level.models = models
    couplings: list[Element] = []
    inductors: set[str] = set()
    for item in items:
        if not isinstance(item, Element):
            continue
        letter = item.letter
        if letter in "RCLDQJM":
            try:
                part = build_part(letter, item.fields, level, item.card)
            except Behavioural as skipped:
                ctx.skip(str(skipped), item.card)
                continue
            ctx.add(part, item.card)
            if letter == "L":
                inductors.add(part.name)
        elif letter == "X":
            _call(level, item)
        elif letter in "VI":
            _source(level, item)
        elif letter == "K":
            couplings.append(item)
        else:  # pragma: no cover - the parser keeps only the letters above
            ctx.skip(SKIPPED_ELEMENTS.get(letter, letter), item.card)
    for item in couplings:
        ctx.add(_coupling(level, item, inductors), item.card)


def _coupling(level: _Level, el: Element, inductors: set[str]) -> Part:
    card = el.card
    name = level.part_name(el.fields[0])
    ef = split_element(el.fields, card)
    if len(ef.positional) != 3:
        raise card.error(f"{name}: a coupling needs two inductor names and a coefficient (manual 3.3.12)")
    names = []
    for ind in ef.positional[:2]:
        full = level.part_name(ind)
        if not ind.upper().startswith("L") or full not in inductors:
            raise card.error(f"{name}: unknown inductor {ind.upper()}")
        names.append(full)
    k = level.value(ef.positional[2], card)
    if not 0.0 < k <= 1.0:
        raise card.error(f"{name}: coupling coefficient {k:g} is outside 0 < k <= 1 (manual 3.3.12)")
    return Part(name, "K", (), k, None, {"inductors": tuple(names)}, None, Location(card.path, card.line))


def flatten(deck: Deck, keep_sources: bool = False) -> Flat:
    """Expand every subcircuit call of ``deck`` into flat parts."""
    ctx = _Context(deck, keep_sources)
    top = _Level(ctx, "", {}, dict(BUILTIN_PARAMS), {}, {}, {}, ())
    _expand(top, deck.body)
    return ctx.flat
