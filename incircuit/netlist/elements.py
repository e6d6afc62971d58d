"""One element card -> one :class:`Part`, following the ngspice element syntax.

Sections of the ngspice user manual: 3.3.1 "Resistors", 3.3.2
"Semiconductor Resistors", 3.3.6 "Capacitors", 3.3.10 "Inductors", 3.3.12
"Coupled (Mutual) Inductors", 7.1 "Junction Diodes", 8.1 "Bipolar Junction
Transistors", 9.1 "Junction Field-Effect Transistors", 11.1 "MOSFET
devices".

The nominal values follow the manual's equations: R = value*scale/m (3.1),
C = value*scale*m (3.7), L = value*scale/m (3.14); ``m`` and ``scale`` are
folded into :attr:`Part.value` and not kept in ``params``.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Protocol

from ..model import Location, Model, Part
from ..tolerances import default_tolerance
from .lexer import Card, parse_annotations
from .numbers import is_number

__all__ = ["ElementFields", "split_element", "Scope", "build_part", "NODE_COUNTS", "Behavioural"]

#: Pin counts of the semiconductor elements (manual 7.1, 8.1, 9.1, 11.1).
NODE_COUNTS = {"D": (2,), "Q": (3, 4), "J": (3,), "M": (4,)}
#: Model types each element letter accepts (manual table 2.3).
MODEL_TYPES = {
    "D": ("D",),
    "Q": ("NPN", "PNP"),
    "J": ("NJF", "PJF"),
    "M": ("NMOS", "PMOS"),
    "R": ("R",),
    "C": ("C",),
    "L": ("L",),
}
_KIND_NAMES = {"D": "diode", "Q": "bipolar transistor", "J": "JFET", "M": "MOSFET",
               "R": "resistor", "C": "capacitor", "L": "inductor"}


#: A value that depends on circuit quantities (manual 3.3.4, 3.3.9, 3.3.13:
#: behavioural R, C, L): node voltages, branch currents, time, frequency,
#: or the run-time ternary operator.
_BEHAVIOUR = re.compile(r"(?i)(?<![\w.])[vi]\s*\(|(?<![\w.])(?:time|hertz)(?![\w.])|\?")


class Behavioural(Exception):
    """An R, C or L whose value is an expression of circuit quantities."""


class Scope(Protocol):
    """What an element needs from the flattener."""

    def value(self, text: str, card: Card) -> float: ...
    def net(self, name: str) -> str: ...
    def part_name(self, name: str) -> str: ...
    def model(self, name: str) -> tuple[str, Model] | None: ...
    def bins(self, name: str) -> list[tuple[str, Model]]: ...
    def note(self, card: Card, text: str) -> None: ...


@dataclass
class ElementFields:
    positional: list[str]
    keywords: dict[str, list[str]] = field(default_factory=dict)
    flags: list[str] = field(default_factory=list)


def split_element(fields: list[str], card: Card) -> ElementFields:
    """Fields after the name -> positional fields, ``key=value`` pairs, flags.

    Bare numbers after a ``key=value`` pair join its value
    (``ic=0.6, 5.0``); bare words there are flags (``off``).
    """
    out = ElementFields([])
    last: str | None = None
    i = 1
    while i < len(fields):
        f = fields[i]
        if f.lower() == "params:":
            i += 1
            continue
        if f == "=":
            raise card.error("misplaced '=' (no parameter name before it)")
        if i + 1 < len(fields) and fields[i + 1] == "=":
            if i + 2 >= len(fields) or fields[i + 2] == "=":
                raise card.error(f"parameter {f} has no value")
            last = f.lower()
            out.keywords[last] = [fields[i + 2]]
            i += 3
            continue
        if last is None:
            out.positional.append(f)
        elif is_number(f) or f.startswith("{"):
            out.keywords[last].append(f)
        else:
            out.flags.append(f.lower())
        i += 1
    return out


def _params(ef: ElementFields, scope: Scope, card: Card, drop: tuple[str, ...] = ()) -> dict[str, object]:
    params: dict[str, object] = {}
    for key, texts in ef.keywords.items():
        if key in drop:
            continue
        values = tuple(scope.value(t, card) for t in texts)
        params[key] = values[0] if len(values) == 1 else values
    for flag in ef.flags:
        params[flag] = True
    return params


def _annotate(part_kind: str, card: Card, scope: Scope, name: str) -> tuple[dict[str, float], object]:
    """(series-resistance params, tolerance or None) from the comment."""
    found = parse_annotations(card)
    extra: dict[str, float] = {}
    for key, kind in (("esr", "C"), ("dcr", "L")):
        if key in found:
            if part_kind == kind:
                extra[key] = float(found[key])  # type: ignore[arg-type]
            else:
                scope.note(card, f"{name}: {key}= annotation ignored (only for {_KIND_NAMES[kind]}s)")
    tol = found.get("tol")
    if tol is not None and part_kind not in ("R", "C", "L"):
        scope.note(card, f"{name}: tol= annotation ignored (tolerances apply to R, C and L)")
        tol = None
    return extra, tol


def _nodes(ef: ElementFields, count: int, card: Card, name: str, what: str) -> list[str]:
    if len(ef.positional) < count:
        raise card.error(f"wrong pin count: {name} needs {count} nodes{what}, found {len(ef.positional)} fields")
    return ef.positional[:count]


def _passive(letter: str, name: str, ef: ElementFields, scope: Scope, card: Card) -> Part:
    nodes = _nodes(ef, 2, card, name, " and a value")
    rest = " ".join(ef.positional[2:] + [t for texts in ef.keywords.values() for t in texts])
    if _BEHAVIOUR.search(rest):
        raise Behavioural(f"{letter} (behavioural)")
    value_text: str | None = None
    model: Model | None = None
    for f in ef.positional[2:]:
        found = scope.model(f) if not is_number(f) and not f.startswith(("{", "'")) else None
        if found is not None and model is None:
            model = found[1]
            if model.type not in MODEL_TYPES[letter]:
                raise card.error(f"{name}: model {found[0]} is a {model.type} model, not a {_KIND_NAMES[letter]} model")
        elif value_text is None and found is None:
            value_text = f
        else:
            raise card.error(f"{name}: unexpected field {f!r}")
    key = letter.lower()
    if key in ef.keywords or (letter == "R" and "resistance" in ef.keywords):
        if value_text is not None:
            raise card.error(f"{name}: value given twice")
        texts = ef.keywords.get(key) or ef.keywords["resistance"]
        value_text = texts[0]
    if value_text is not None:
        base = scope.value(value_text, card)
    else:
        base = _model_value(letter, name, model, ef, scope, card)
    m = _positive(ef, "m", scope, card, name)
    scale = _positive(ef, "scale", scope, card, name)
    value = base * scale * m if letter == "C" else base * scale / m
    if letter == "R" and value < 0:
        raise card.error(f"{name}: negative resistance {value:g} ohm")
    if letter in "CL" and value <= 0:
        unit = "F" if letter == "C" else "H"
        raise card.error(f"{name}: {_KIND_NAMES[letter]} value must be above zero, found {value:g} {unit}")
    extra, tol = _annotate(letter, card, scope, name)
    params = _params(ef, scope, card, drop=(key, "resistance", "m", "scale"))
    params.update(extra)
    return Part(name, letter, tuple(scope.net(n) for n in nodes), value, None, params,
                tol if tol is not None else default_tolerance(letter, value), Location(card.path, card.line))


def _positive(ef: ElementFields, key: str, scope: Scope, card: Card, name: str) -> float:
    if key not in ef.keywords:
        return 1.0
    value = scope.value(ef.keywords[key][0], card)
    if value <= 0:
        raise card.error(f"{name}: {key}={value:g} must be above zero")
    return value


def _model_value(letter: str, name: str, model: Model | None, ef: ElementFields, scope: Scope, card: Card) -> float:
    """The value of an R, C or L that names a model instead (manual 3.3.3, 3.3.8, 3.3.11)."""
    if model is None:
        raise card.error(f"{name}: no value")
    p = model.params
    for key in {"R": ("r", "res"), "C": ("cap",), "L": ("ind",)}[letter]:
        if key in p:
            return float(p[key])
    if letter == "R":
        length = scope.value(ef.keywords["l"][0], card) if "l" in ef.keywords else None
        width = scope.value(ef.keywords["w"][0], card) if "w" in ef.keywords else p.get("defw", 1e-6)
        if "rsh" in p and length is not None:
            w_eff = width - p.get("narrow", 0.0)
            if w_eff <= 0:
                raise card.error(f"{name}: effective width {w_eff:g} m is not above zero")
            return p["rsh"] * (length - p.get("short", 0.0)) / w_eff
        scope.note(card, f"{name}: no value, no rsh and length: ngspice's default of 1 mohm used (manual 3.3.3)")
        return 1e-3
    raise card.error(f"{name}: no {_KIND_NAMES[letter]} value (geometric {letter} models are not read)")


def _semiconductor(letter: str, name: str, ef: ElementFields, scope: Scope, card: Card) -> Part:
    pos = ef.positional
    counts = NODE_COUNTS[letter]
    found = None
    at = 0
    if letter == "M" and len(pos) > 3:  # a VDMOS has 3 nodes (manual 11.3)
        candidate = scope.model(pos[3])
        if candidate is not None and candidate[1].params.get("vdmos"):
            found, at = candidate, 3
    for n in counts:
        if found is None and len(pos) > n:
            found, at = scope.model(pos[n]), n
    if found is None and letter == "M" and len(pos) > 4:
        found, at = _binned(pos[4], ef, scope, card, name), 4
    if found is None:
        need = " or ".join(str(c) for c in counts)
        later = [f for f in pos[max(counts) + 1:] if scope.model(f) is not None]
        if len(pos) <= min(counts) or later:
            raise card.error(f"wrong pin count: {name} needs {need} nodes and a model name, "
                             f"found {len(pos) - (1 if later else 0)} fields before the model")
        names = [pos[n] for n in counts if n < len(pos)]
        raise card.error(f"{name}: model {' or '.join(n.upper() for n in names)} not defined")
    board_name, model = found
    if model.type not in MODEL_TYPES[letter]:
        raise card.error(f"{name}: model {board_name} is a {model.type} model, not a {_KIND_NAMES[letter]} model")
    nodes = list(pos[:at])
    if at == 3 and letter == "M":
        nodes.append(nodes[2])  # VDMOS: bulk on source
    params = _params(ef, scope, card)
    for f in pos[at + 1:]:
        if letter in "DQJ" and "area" not in params and (is_number(f) or f.startswith("{")):
            params["area"] = scope.value(f, card)
        elif not is_number(f) and not f.startswith(("{", "'")):
            params[f.lower()] = True
        else:
            raise card.error(f"{name}: unexpected field {f!r}")
    _annotate(letter, card, scope, name)
    return Part(name, letter, tuple(scope.net(n) for n in nodes), None, board_name, params, None,
                Location(card.path, card.line))


def _binned(model_name: str, ef: ElementFields, scope: Scope, card: Card, name: str) -> tuple[str, Model] | None:
    """The binned model ``NAME.n`` whose LMIN..LMAX, WMIN..WMAX hold the
    instance's l and w (manual 3.2.3 "Model binning")."""
    bins = scope.bins(model_name)
    if not bins:
        return None
    size = {k: scope.value(ef.keywords[k][0], card) for k in ("l", "w") if k in ef.keywords}
    for board_name, model in bins:
        p = model.params
        if all(p.get(k + "min", 0.0) <= v <= p.get(k + "max", float("inf")) for k, v in size.items()):
            return board_name, model
    raise card.error(f"{name}: no binned model {model_name.upper()}.n covers "
                     + " ".join(f"{k}={v:g}" for k, v in size.items()))


def build_part(letter: str, fields: list[str], scope: Scope, card: Card) -> Part:
    """The part of an R, C, L, D, Q, J or M card (already named by scope)."""
    name = scope.part_name(fields[0])
    ef = split_element(fields, card)
    if letter in "RCL":
        return _passive(letter, name, ef, scope, card)
    return _semiconductor(letter, name, ef, scope, card)
