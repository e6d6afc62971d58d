"""Typed readings: what a technician types after looking at the tester.

:func:`parse_reading` turns text such as ``"4.1uF esr 2.3ohm"``, ``"4k7"``,
``"diode 0.58V"`` or ``"nothing"`` into a :class:`~incircuit.model.Reading`.

Rules (docs/diagnose.md has the full list):

* **``M`` is mega and ``m`` is milli.** People type ``1M`` for a mega-ohm
  reading, so this differs on purpose from SPICE netlists (where ``M`` is
  milli and mega is ``Meg``). ``meg`` (any case) is mega too; ``k``/``K``
  kilo; ``u``/``U``/``µ`` micro; ``n``/``N`` nano; ``p``/``P`` pico; ``G``
  giga; ``T`` tera. There is no femto: ``f`` is farad.
* Units are optional and case-insensitive: ``ohm``/``ohms``/``Ω``/``R``,
  ``F``, ``H``, ``V``.
* The IEC 60062 letter-as-decimal-point code: ``4k7`` = 4.7 k, ``2R2`` = 2.2,
  ``R47`` = 0.47, ``1M5`` = 1.5 M, ``4u7`` = 4.7 µ, ``4n7``, ``4p7``.
* A leading kind word: ``res``/``resistor``, ``cap``/``capacitor``,
  ``ind``/``inductor``/``coil``, ``diode``/``led``, ``npn``/``pnp``.
* ``nothing``, ``none``, ``open``: the tester found no part.
* A secondary value after the first: ``esr 2.3ohm``, ``, ESR 2.3``, ``esr=2R3``.

The kind comes from, in order: the unit; the kind word; ``default_kind``
(the kind of the part being diagnosed) when the prefix letter suits it
(``100u`` on an inductor is 100 uH); else the prefix letter (the IEC 60062
resistor letters R k M G T mean ohms, p n u mean farads: ``10k`` on a
capacitor is a resistance reading). A bare number is read as ohms or volts
only; a capacitance or inductance needs a prefix or a unit.

>>> parse_reading("4k7")
Reading(kind='resistor', value=4700.0, unit='ohm', extra=mappingproxy({}))
>>> r = parse_reading("4.1uF, ESR 2.3")
>>> (r.kind, round(r.value * 1e6, 6), r.extra["esr"])
('capacitor', 4.1, 2.3)
>>> parse_reading("diode 580mV").value
0.58
"""

from __future__ import annotations

import csv
import math
import re
from dataclasses import dataclass
from typing import Callable, NoReturn

from .errors import InputError, ReadingError
from .model import Board, Reading

__all__ = ["parse_reading", "Observation", "observation", "load_observations", "parse_probes",
           "PREFIXES", "KIND_WORDS", "NOTHING_WORDS", "PART_KIND_READINGS", "PLAUSIBLE_MAX"]

#: Prefix -> power of ten. Case-sensitive: M mega, m milli ("meg" any case).
PREFIXES = {
    "T": 12, "G": 9, "M": 6, "meg": 6, "k": 3, "K": 3,
    "m": -3, "u": -6, "U": -6, "n": -9, "N": -9, "p": -12, "P": -12,
}

#: Unit word (lower case) -> reading kind.
_UNITS = {
    "ohm": "resistor", "ohms": "resistor", "r": "resistor",
    "f": "capacitor", "farad": "capacitor", "farads": "capacitor",
    "h": "inductor", "henry": "inductor", "henries": "inductor",
    "v": "diode", "volt": "diode", "volts": "diode",
}

#: Kind word (lower case) -> reading kind.
KIND_WORDS = {
    "res": "resistor", "resistor": "resistor", "resistance": "resistor",
    "cap": "capacitor", "capacitor": "capacitor", "capacitance": "capacitor",
    "ind": "inductor", "inductor": "inductor", "inductance": "inductor", "coil": "inductor",
    "diode": "diode", "led": "diode", "junction": "diode",
    "npn": "bjt-npn", "pnp": "bjt-pnp",
}

#: Texts that mean "the tester found nothing".
NOTHING_WORDS = ("nothing", "none", "open", "nothing found", "no part", "open circuit")

#: Part kind (SPICE letter) -> the reading kind a bare value most likely means.
PART_KIND_READINGS = {"R": "resistor", "C": "capacitor", "L": "inductor", "D": "diode"}

#: Largest believable value per kind (SI); above it a prefix was surely
#: mistyped (e.g. "4.7MF": M is mega here).
PLAUSIBLE_MAX = {"capacitor": 10.0, "inductor": 1e3, "diode": 50.0}

#: Secondary value key -> the reading kind it belongs to. All are ohms.
_SECONDARY = {"esr": "capacitor"}

#: Prefix or IEC 60062 code letter -> kind it implies when nothing else says.
_LETTER_KIND = {"R": "resistor", "r": "resistor", "k": "resistor", "K": "resistor",
                "M": "resistor", "meg": "resistor", "G": "resistor", "T": "resistor",
                "p": "capacitor", "P": "capacitor", "n": "capacitor", "N": "capacitor",
                "u": "capacitor", "U": "capacitor"}

#: Prefix or code letters that suit each kind of reading.
_LETTER_FITS = {
    "resistor": {"R", "r", "k", "K", "M", "meg", "G", "T", "m"},
    "capacitor": {"p", "P", "n", "N", "u", "U", "m"},
    "inductor": {"n", "N", "u", "U", "m"},
    "diode": {"m"},
}

_EXPECTED = ("expected a value with optional SI prefix and unit (4.7uF, 10k, 2R2, 580mV; "
             "M = mega, m = milli), an optional kind word (res, cap, diode), "
             "an optional 'esr 2.3', or 'nothing'")

_UNIT_RE = r"(?P<unit>(?i:ohms?|farads?|henry|henries|volts?|[rfhv]))"
_NUMBER = re.compile(
    r"^(?P<num>\d+(?:\.\d*)?|\.\d+)(?:[eE](?P<exp>[+-]?\d+))?"
    rf"(?P<prefix>(?i:meg)|[TGMkKmuUnNpP])?{_UNIT_RE}?$"
)
_IEC = re.compile(rf"^(?P<int>\d*)(?P<letter>[RrkKMGTpPnNuUm])(?P<frac>\d+){_UNIT_RE}?$")
_SECONDARY_RE = re.compile(r"[,;\s]*\b(?P<key>esr)\b\s*[:=]?\s*(?P<value>.+?)\s*$", re.IGNORECASE)
_KIND_RE = re.compile(r"^(?P<word>[a-z]+)(?:\s*[:=]\s*|\s+|(?=[\d.])|$)", re.IGNORECASE)

_Fail = Callable[[str], NoReturn]


def _normalise(text: str) -> str:
    text = text.replace("\u00b5", "u").replace("\u03bc", "u")  # micro sign, Greek mu
    text = text.replace("\u2126", "ohm").replace("\u03a9", "ohm")  # ohm sign, Greek Omega
    return " ".join(text.split()).strip(" ,;")


def _value(token: str, fail: _Fail) -> tuple[float, str | None, str | None]:
    """(value, kind from the unit, the prefix or code letter if any)."""
    token = token.replace(" ", "")
    if "," in token:
        fail("a comma inside a number is ambiguous: write a decimal point (4.7) or 4u7")
    unit_kind = None
    m = _IEC.match(token)
    if m:
        letter = m["letter"]
        power = 0 if letter in "Rr" else PREFIXES[letter]
        value = float(f"{m['int'] or '0'}.{m['frac']}e{power}")
    else:
        m = _NUMBER.match(token)
        if not m:
            fail(f"{token!r} is not a number with an optional prefix and unit")
        prefix = m["prefix"]
        if prefix and prefix.lower() == "meg":
            prefix = "meg"
        power = int(m["exp"] or 0) + (PREFIXES[prefix] if prefix else 0)
        value = float(f"{m['num']}e{power}")  # one rounding: 4.7e-9, not 4.700000000000001e-09
        letter = prefix
    if m["unit"]:
        unit_kind = _UNITS[m["unit"].lower()]
    return value, unit_kind, letter or None


def _kind_of_letter(letter: str | None, default_kind: str | None) -> str | None:
    """The part's kind when the letter suits it (``100u`` on an inductor is
    100 uH), else the kind the letter implies (``10k`` on a capacitor is a
    resistance reading), else the part's kind."""
    if letter is None or letter in _LETTER_FITS.get(default_kind or "", ()):
        return default_kind
    return _LETTER_KIND.get(letter) or default_kind


def parse_reading(text: str, default_kind: str | None = None, *,
                  path: str | None = None, line: int | None = None) -> Reading:
    """The :class:`Reading` that ``text`` describes.

    Parameters
    ----------
    text
        What the technician typed.
    default_kind
        Reading kind to assume when nothing in the text says (usually from
        the part being diagnosed, see :data:`PART_KIND_READINGS`).
    path, line
        Where the text came from, for the error message.

    Raises
    ------
    ReadingError
        One line naming what was expected.
    """
    original = (text or "").strip()

    def fail(why: str) -> NoReturn:
        raise ReadingError(f"cannot read {original!r}: {why}; {_EXPECTED}", path, line)

    text = _normalise(text or "")
    if not text:
        fail("it is empty")
    if text.lower() in NOTHING_WORDS:
        return Reading("nothing")

    extra: dict[str, float] = {}
    m = _SECONDARY_RE.search(text)
    if m and m.start() > 0:
        key = m["key"].lower()
        value, unit_kind, _ = _value(m["value"], fail)
        if unit_kind not in (None, "resistor"):
            fail(f"{key} must be a resistance")
        extra[key] = value
        text = text[: m.start()].rstrip(" ,;")

    word_kind = None
    m = _KIND_RE.match(text)
    if m and m["word"].lower() in KIND_WORDS:
        word_kind = KIND_WORDS[m["word"].lower()]
        text = text[m.end():]
        if not text:
            fail(f"the kind word {m['word']!r} needs a value after it")
    value, unit_kind, letter = _value(text, fail)
    has_letter = letter is not None

    if word_kind in ("bjt-npn", "bjt-pnp"):
        if unit_kind or has_letter:
            fail("a transistor's value is its current gain, a plain number")
        kind = word_kind
    else:
        if unit_kind and word_kind and unit_kind != word_kind:
            fail(f"a {word_kind} is not measured in that unit")
        kind = unit_kind or word_kind or _kind_of_letter(letter, default_kind)
        if kind is None:
            fail("nothing says what was measured: add a unit or a kind word")
        if kind in ("capacitor", "inductor") and not (unit_kind or has_letter):
            fail(f"a bare number is ambiguous for a {kind}: add a prefix or a unit")
        if value > PLAUSIBLE_MAX.get(kind, math.inf):
            fail(f"{value:g} is not a believable {kind} reading (M is mega, m is milli, u is micro)")
    for key in extra:
        if kind != _SECONDARY[key]:
            fail(f"{key} belongs to a {_SECONDARY[key]} reading")
    if not math.isfinite(value) or value <= 0:
        fail("the value must be above zero (for a dead short type the smallest figure shown, e.g. 0.1ohm)")
    return Reading(kind, value, extra=extra)


# -- observations: a reading on named probes --------------------------------
@dataclass(frozen=True)
class Observation:
    """One reading: what was typed, on which probed nets, about which part,
    and where it came from (``"file:line"`` or None)."""

    part: str
    probes: tuple[str, ...]
    reading: Reading
    text: str = ""
    where: str | None = None

    def to_dict(self) -> dict:
        return {"part": self.part, "probes": list(self.probes), "text": self.text,
                **self.reading.to_dict()}


def parse_probes(text: str, board: Board, separators: str = ",;",
                 path: str | None = None, line: int | None = None) -> tuple[str, ...]:
    """Two or three net names separated by any of ``separators``, checked
    against the board (names are case-insensitive)."""
    names = [n.strip().upper() for n in re.split(f"[{re.escape(separators)}]", text) if n.strip()]
    if not 2 <= len(names) <= 3:
        raise InputError(f"probes {text!r}: give two or three nets, like NET1{separators[0]}NET2",
                         path, line)
    nets = set(board.nets)
    for name in names:
        if name not in nets:
            raise InputError(f"probes {text!r}: no net {name!r} on board {board.name}", path, line)
    if len(set(names)) != len(names):
        raise InputError(f"probes {text!r}: a net is named twice", path, line)
    return tuple(names)


def observation(board: Board, part: str, text: str, probes: str | None = None,
                path: str | None = None, line: int | None = None) -> Observation:
    """An :class:`Observation` of ``part`` from typed ``text``; ``probes``
    like ``"NET1,NET2"`` (None or empty: the part's own pins, up to three)."""
    name = part.strip().upper()
    if not board.has_part(name):
        raise InputError(f"no part {part.strip()!r} on board {board.name}", path, line)
    p = board.part(name)
    if probes and probes.strip():
        nets = parse_probes(probes, board, ",;", path, line)
    else:
        nets = tuple(dict.fromkeys(p.pins))[:3]
        if len(nets) < 2:
            raise InputError(f"{name} has fewer than two distinct nets: give probes", path, line)
    reading = parse_reading(text, PART_KIND_READINGS.get(p.kind), path=path, line=line)
    where = f"{path}:{line}" if path is not None else None
    return Observation(name, nets, reading, text.strip(), where)


def load_observations(path: str, board: Board) -> list[Observation]:
    """Readings from a CSV file with the header ``part,probes,reading``.

    ``probes`` is ``NET1;NET2`` (or ``NET1;NET2;NET3``) or empty for the
    part's own pins. Blank lines and lines starting with ``#`` are skipped.
    A bad row raises InputError naming the file and line.
    """
    try:
        with open(path, newline="", encoding="utf-8") as handle:
            lines = handle.read().splitlines()
    except OSError as error:
        raise InputError(f"cannot read readings file: {error.strerror}", path) from None
    except UnicodeDecodeError:
        raise InputError("readings file is not UTF-8 text", path) from None
    rows = [(no, text) for no, text in enumerate(lines, 1)
            if text.strip() and not text.lstrip().startswith("#")]
    if not rows:
        raise InputError("readings file is empty: expected the header part,probes,reading", path, 1)
    head_no, head = rows[0]
    header = [h.strip().lower() for h in next(csv.reader([head]))]
    if header != ["part", "probes", "reading"]:
        raise InputError(f"expected the header part,probes,reading, found {head.strip()!r}",
                         path, head_no)
    out = []
    for no, text in rows[1:]:
        cells = next(csv.reader([text]))
        if len(cells) != 3:
            raise InputError(f"expected 3 cells (part,probes,reading), found {len(cells)}", path, no)
        part, probes, typed = cells
        if not part.strip():
            raise InputError("the part cell is empty", path, no)
        out.append(observation(board, part, typed, probes.replace(";", ","), path, no))
    if not out:
        raise InputError("readings file has a header but no readings", path, head_no)
    return out
