"""Netlist text -> cards with positions, fields and comment annotations.

The rules are those of the ngspice user manual, chapter 2 "Circuit
Description": the first line is the title (2.3.1 ".TITLE line"); a ``*``
line is a comment (2.3.3 "Comments"); ``;``, ``$`` and ``//`` start an
end-of-line comment (2.3.4 "End-of-line comments"), where ``$`` and ``//``
count only at the start of the line or after a blank or comma, so that
``1k$x`` stays one (bad) field; a line starting with ``+`` continues the
card before it (2.3.5 "Continuation lines"), comment and blank lines in
between being skipped. Fields are separated by blanks, commas, ``=`` and
parentheses (2.1.4.1 "Lines"); ``{...}`` and ``'...'`` expressions stay one
field.

Each card keeps the file and line of its first physical line, and the text
of its end-of-line comments, where the part annotations live::

    C1 a b 10u ; tol=-20%/+80% esr=0.5

>>> title, cards = read_cards("demo\\nR1 a b 1k ; tol=1%\\n+ m=2\\n", "x.cir")
>>> title, cards[0].text, cards[0].line, cards[0].comment
('demo', 'R1 a b 1k m=2', 2, 'tol=1%')
>>> split_fields(cards[0])
['R1', 'a', 'b', '1k', 'm', '=', '2']
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from ..errors import NetlistError
from ..model import Tolerance
from .numbers import NumberError, parse_number

__all__ = ["Card", "read_cards", "split_fields", "parse_annotations", "decode"]


@dataclass(frozen=True)
class Card:
    """One logical line: continuation lines joined, comments removed."""

    text: str
    path: str
    line: int
    #: End-of-line comments of all its physical lines, joined by " ".
    comment: str = ""

    def error(self, message: str) -> NetlistError:
        """A :class:`NetlistError` at this card's position."""
        return NetlistError(_one_line(message), self.path, self.line)


#: Characters stripped from both ends of a line: white space, and the
#: DOS end-of-file mark (Ctrl-Z) that old files carry on their last line.
_BLANKS = " \t\r\f\v\x1a\x00"


def _one_line(message: str) -> str:
    return " ".join(message.split())


def decode(data: bytes) -> str:
    """File bytes as text: UTF-8 (with or without BOM), else Latin-1."""
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError:
        return data.decode("latin-1")


def _strip_comment(line: str) -> tuple[str, str]:
    """Split a physical line into (code, end-of-line comment)."""
    quote = ""
    depth = 0
    for i, c in enumerate(line):
        if quote:
            if c == quote:
                quote = ""
            continue
        if c in "'\"":
            quote = c
        elif c == "{":
            depth += 1
        elif c == "}":
            depth = max(depth - 1, 0)
        elif depth:
            continue
        elif c == ";":
            return line[:i], line[i + 1:].strip()
        elif c == "$" or (c == "/" and line[i + 1:i + 2] == "/"):
            if i == 0 or line[i - 1] in " \t,":
                skip = 1 if c == "$" else 2
                return line[:i], line[i + skip:].strip()
    return line, ""


def read_cards(text: str, path: str, has_title: bool = True) -> tuple[str, list[Card]]:
    """The title line and the cards of one file's text.

    ``has_title`` is False for an included file, whose first line is an
    ordinary line.
    """
    lines = text.split("\n")
    title = ""
    start = 0
    if has_title and lines:
        title = lines[0].rstrip("\r").strip()
        start = 1
    cards: list[Card] = []
    pending: list[str] = []  # code parts of the card being built
    notes: list[str] = []
    first = 0

    def flush() -> None:
        if pending:
            code = " ".join(p for p in pending if p)
            cards.append(Card(code.strip(), path, first, " ".join(n for n in notes if n)))
        pending.clear()
        notes.clear()

    for number, raw in enumerate(lines[start:], start + 1):
        stripped = raw.strip(_BLANKS)
        if not stripped or stripped[0] == "*":
            continue
        code, comment = _strip_comment(stripped)
        if stripped[0] == "+":
            if not pending:
                raise NetlistError("continuation line '+' with no card before it", path, number)
            code, comment = _strip_comment(stripped[1:])
            pending.append(code.strip())
            notes.append(comment)
            continue
        if not code.strip():
            continue  # a line holding only a comment
        flush()
        first = number
        pending.append(code.strip())
        notes.append(comment)
    flush()
    return title, cards


def split_fields(card: Card) -> list[str]:
    """The fields of a card; ``=`` is a field of its own.

    Blanks, commas and parentheses separate fields; ``{...}`` and quoted
    text stay whole. Unbalanced braces, quotes or parentheses are errors.
    """
    text = card.text
    fields: list[str] = []
    word: list[str] = []
    parens = 0
    i = 0
    n = len(text)

    def end_word() -> None:
        if word:
            fields.append("".join(word))
            word.clear()

    while i < n:
        c = text[i]
        if c in " \t,":
            end_word()
        elif c == "(":
            end_word()
            parens += 1
        elif c == ")":
            end_word()
            parens -= 1
            if parens < 0:
                raise card.error("unbalanced parentheses: ')' without '('")
        elif c == "=":
            end_word()
            fields.append("=")
        elif c == "{":
            depth = 0
            j = i
            while j < n:
                if text[j] == "{":
                    depth += 1
                elif text[j] == "}":
                    depth -= 1
                    if depth == 0:
                        break
                j += 1
            if depth:
                raise card.error("unbalanced braces: '{' without '}'")
            word.append(text[i:j + 1])
            i = j
        elif c == "}":
            raise card.error("unbalanced braces: '}' without '{'")
        elif c in "'\"":
            j = text.find(c, i + 1)
            if j < 0:
                raise card.error(f"unbalanced quotes: {c} without its closing {c}")
            word.append(text[i:j + 1])
            i = j
        else:
            word.append(c)
        i += 1
    end_word()
    if parens:
        raise card.error("unbalanced parentheses: '(' without ')'")
    return fields


_ANNOTATION = re.compile(r"(?i)(?<![A-Za-z0-9_])(tol|esr|dcr)\s*=\s*(\S*)")
_PERCENT = r"(\d+(?:\.\d*)?|\.\d+)\s*%"
_SYMMETRIC = re.compile(r"(?:\+-|±|\+/-)?" + _PERCENT + r"$")
_ASYMMETRIC = re.compile(r"([+-])" + _PERCENT + r"/([+-])" + _PERCENT + r"$")


def _tolerance(text: str, card: Card) -> Tolerance:
    bad = card.error(f"bad tolerance {text!r} (write tol=5% or tol=-20%/+80%)")
    m = _SYMMETRIC.match(text)
    if m:
        minus = plus = float(m.group(1)) / 100.0
    else:
        m = _ASYMMETRIC.match(text)
        if not m or m.group(1) == m.group(3):
            raise bad
        first, second = float(m.group(2)) / 100.0, float(m.group(4)) / 100.0
        minus, plus = (first, second) if m.group(1) == "-" else (second, first)
    if minus >= 1.0:
        raise card.error(f"bad tolerance {text!r}: the minus side must be below 100%")
    return Tolerance(minus, plus, "netlist")


def parse_annotations(card: Card) -> dict[str, object]:
    """Part annotations in the card's end-of-line comment.

    ``tol=5%`` or ``tol=-20%/+80%`` gives a :class:`Tolerance`; ``esr=`` and
    ``dcr=`` give ohms (SPICE numbers, so ``esr=50m`` is 0.05 ohm).

    >>> c = Card("C1 a b 1u", "x", 1, "tol=-20%/+80% esr=50m")
    >>> a = parse_annotations(c); a["tol"].minus, a["tol"].plus, a["esr"]
    (0.2, 0.8, 0.05)
    """
    found: dict[str, object] = {}
    for m in _ANNOTATION.finditer(card.comment):
        key, text = m.group(1).lower(), m.group(2)
        if key == "tol":
            # "tol=5 %": allow one blank before the percent sign
            if text and not text.endswith("%") and card.comment[m.end():].lstrip().startswith("%"):
                text += "%"
            found["tol"] = _tolerance(text, card)
            continue
        try:
            value = parse_number(text)
        except NumberError:
            raise card.error(f"bad {key} annotation {text!r} (write {key}=0.5 in ohm)") from None
        if value < 0:
            raise card.error(f"{key}={text} is negative")
        found[key] = value
    return found
