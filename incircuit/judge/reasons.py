"""Reasons in plain words: why the in-circuit reading differs, with numbers.

Two sources are combined:

* the graph (:mod:`incircuit.graph`): the paths beside the part between the
  probed nets, their parts in order, DC resistance or series capacitance;
* the simulation of the in-circuit identification run: at the end of each
  step the engine reports every net's voltage, from which follow the
  forward voltage and Shockley current of every junction (which junctions
  conducted under the tester's drive) and, for a resistor or junction under
  test, its share of the current the probes pushed into the board.

Every number is printed with :func:`incircuit.units.format_value`.

>>> from incircuit.model import Board, Part, Reading
>>> b = Board("t", (Part("R3", "R", ("A", "B"), 10e3), Part("R14", "R", ("A", "M"), 4.7e3),
...                 Part("R15", "R", ("M", "B"), 10e3)))
>>> iso, inc = Reading("resistor", 10e3), Reading("resistor", 5.95e3)
>>> path_reasons(b, "R3", ("A", "B"), iso, inc)[0]
'R14 (4.7 kohm) and R15 (10 kohm) in series form a 14.7 kohm path beside R3: in parallel they give 5.95 kohm'
>>> deviation_reason("R3", iso, inc)
'in circuit the tester reads 5.95 kohm instead of 10 kohm (40 % low)'
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Iterable, Sequence

from ..bench.junctions import Junction, junctions
from ..circuit import elements
from ..graph import Path, between
from ..model import Board, Reading
from ..units import format_value
from .thresholds import CONDUCTING_CURRENT, CURRENT_SHARE_SHOWN

__all__ = [
    "Conduction", "conducting_junctions", "current_share", "path_reasons", "deviation_reason",
    "junction_reasons", "share_reason", "sensitivity_reason", "reading_text",
]

_KIND_WORD = {"resistor": "a resistor", "capacitor": "a capacitor", "inductor": "an inductor",
              "diode": "a junction", "diode-pair": "two junctions", "nothing": "nothing",
              "unreadable": "no stable reading", "bjt-npn": "an NPN transistor",
              "bjt-pnp": "a PNP transistor", "mosfet-n-enh": "an N-channel MOSFET",
              "mosfet-p-enh": "a P-channel MOSFET", "mosfet-n-dep": "an N-channel depletion MOSFET",
              "mosfet-p-dep": "a P-channel depletion MOSFET", "jfet-n": "an N-channel JFET",
              "jfet-p": "a P-channel JFET"}


def reading_text(r: Reading, detail: bool = False) -> str:
    """``"10 kohm"``, ``"a junction (612 mV)"``, ``"nothing"``; with
    ``detail`` a capacitor's ESR and self-discharge follow."""
    if r.value is not None and r.kind in ("resistor", "capacitor", "inductor"):
        text = format_value(r.value, r.unit)
        if detail and r.kind == "capacitor":
            if r.extra.get("esr") is not None:
                text += f", ESR {format_value(float(r.extra['esr']), 'ohm')}"  # type: ignore[arg-type]
            if r.extra.get("self_discharge"):
                text += f", drops {float(r.extra['self_discharge']) * 100:.0f} %"  # type: ignore[arg-type]
        return text
    word = _KIND_WORD.get(r.kind, r.kind)
    if r.value is not None and r.unit == "1":
        return f"{word} (hFE {r.value:.0f})"
    return f"{word} ({format_value(r.value, r.unit)})" if r.value is not None else word


def deviation_reason(part: str, iso: Reading, inc: Reading) -> str:
    """How far the in-circuit reading is from the part's own reading."""
    if iso.kind != inc.kind:
        return (f"in circuit the tester reads {reading_text(inc)} instead of "
                f"{reading_text(iso)}: the reading changes kind")
    if iso.value and inc.value is not None:
        rel = (inc.value - iso.value) / iso.value
        if abs(rel) < 0.005:
            return f"in circuit the tester reads {reading_text(inc)}, as {part} alone"
        side = "low" if rel < 0 else "high"
        return (f"in circuit the tester reads {reading_text(inc)} instead of {reading_text(iso)} "
                f"({abs(rel) * 100:.0f} % {side})")
    return f"in circuit the tester reads {reading_text(inc)}"


def _labels(path: Path) -> str:
    labels = [k.label() for k in path.links] or list(path.parts)
    return labels[0] if len(labels) == 1 else ", ".join(labels[:-1]) + " and " + labels[-1]


def _parallel(a: float, b: float) -> float:
    return a * b / (a + b)


def _resistive(path: Path, name: str, kind: str, value: float | None) -> str:
    ohms = path.dc_resistance or 0.0
    if len(path.parts) == 1:
        text = f"{_labels(path)} lies beside {name}"
    else:
        text = f"{_labels(path)} in series form a {format_value(ohms, 'ohm')} path beside {name}"
    if kind == "R" and value and ohms > 0:
        text += f": in parallel they give {format_value(_parallel(value, ohms), 'ohm')}"
    elif kind == "C" and value and ohms > 0:
        text += (f": it discharges {name} with a time constant of "
                 f"{format_value(ohms * value, 's')}")
    elif kind == "L":
        text += ": the current divides between them"
    return text


def _capacitive(path: Path, name: str, kind: str, value: float | None) -> str:
    c = path.capacitance
    if kind == "C" and c is not None:
        if len(path.parts) == 1:
            nets = " and ".join(path.nets[::len(path.nets) - 1])
            total = c + (value or 0.0)
            return (f"{_labels(path)} and {name} share nets {nets}: the reading is their sum "
                    f"({format_value(total, 'F')})")
        return f"{_labels(path)} in series add {format_value(c, 'F')} beside {name}"
    if kind == "R" and c is not None and value:
        return (f"{_labels(path)} beside {name} must charge first (time constant "
                f"{format_value(value * c, 's')})")
    return f"{_labels(path)} lies beside {name}"


def _one_path(path: Path, name: str, kind: str, value: float | None) -> str:
    if path.kind == "resistive":
        return _resistive(path, name, kind, value)
    if path.kind == "capacitive":
        return _capacitive(path, name, kind, value)
    if path.kind == "inductive":
        return f"{_labels(path)} joins the same nets: a short at DC beside {name}"
    if path.kind == "chip":
        return f"{_labels(path)} joins the same nets beside {name}"
    if path.kind == "junction":
        return f"{_labels(path)} lies beside {name} and conducts only when forward biased"
    return f"{_labels(path)} lies beside {name}"


def path_reasons(board: Board, part: str, probes: Sequence[str], iso: Reading, inc: Reading,
                 limit: int = 4) -> list[str]:
    """What the graph shows between the probed nets, most influential first."""
    p = board.part(part)
    nets = list(dict.fromkeys(probes))
    out: list[str] = []
    for i, a in enumerate(nets):
        for b in nets[i + 1:]:
            found = between(board, a, b, without=(p.name,))
            if found.tied:
                out.append(f"nets {a} and {b} are tied by a part that acts as a wire: "
                           f"the tester sees a short across {p.name}")
                continue
            paths = [q for q in found.paths if q.kind != "junction"]
            for path in paths[:limit]:
                out.append(_one_path(path, p.name, p.kind, p.value))
            if len(paths) > limit:
                out.append(f"{len(paths) - limit} more paths join {a} and {b}")
            rest = found.equivalent_resistance
            resistive = [q for q in paths if q.kind == "resistive"]
            if len(resistive) > 1 and math.isfinite(rest) and p.kind == "R" and p.value:
                out.append(f"together the resistors beside {p.name} measure "
                           f"{format_value(rest, 'ohm')} between {a} and {b}; with {p.name} "
                           f"{format_value(_parallel(p.value, rest), 'ohm')}")
    if not out and iso.kind == inc.kind:
        out.append(f"nothing else on the board joins the probed nets of {p.name}")
    return out


@dataclass(frozen=True)
class Conduction:
    """A junction's largest forward bias during the run."""

    junction: Junction
    volts: float
    current: float


def conducting_junctions(board: Board, run, minimum: float = CONDUCTING_CURRENT) -> list[Conduction]:
    """Junctions whose Shockley current reached ``minimum`` at the end of
    some step of ``run`` (from the node voltages the engine reported)."""
    best: dict[str, Conduction] = {}
    js = junctions(elements(board))
    for step in getattr(run, "steps", ()):
        nets = step.result.nets
        for j in js:
            if j.anode not in nets or j.cathode not in nets:
                continue
            v = float(nets[j.anode]) - float(nets[j.cathode])
            i = j.current(v)
            if i >= minimum and (j.name not in best or i > best[j.name].current):
                best[j.name] = Conduction(j, v, i)
    return sorted(best.values(), key=lambda c: -c.current)


def _probe_current(step) -> float:
    """Current the driven probes pushed into the board during ``step`` (A)."""
    total = 0.0
    for src, v in zip(step.drive, step.result.volts):
        if src is not None and src.resistance > 0:
            total += max(0.0, (src.volts - v) / src.resistance)
    return total


def current_share(board: Board, part: str, run) -> tuple[float, float, float] | None:
    """(share of the probe current through ``part``, that current, probe
    current) at the end of the step that drove the most current; only for
    a resistor or a diode under test, whose current follows from its pins'
    voltages."""
    p = board.part(part)
    if p.kind not in ("R", "D") or len(p.pins) != 2:
        return None
    js = [j for j in junctions(elements(board.only(p.name)))] if p.kind == "D" else []
    best = None
    for step in getattr(run, "steps", ()):
        nets = step.result.nets
        if p.pins[0] not in nets or p.pins[1] not in nets:
            continue
        total = _probe_current(step)
        if total <= 0:
            continue
        v = float(nets[p.pins[0]]) - float(nets[p.pins[1]])
        if p.kind == "R":
            if not p.value:
                continue
            i = abs(v) / p.value
        else:
            i = js[0].current(v) if js else 0.0
        if best is None or total > best[2]:
            best = (min(i / total, 1.0), i, total)
    return best


def junction_reasons(conducting: Iterable[Conduction], part: str, iso: Reading, inc: Reading) -> list[str]:
    """``"D2 conducts at about 600 mV under the tester's drive: ..."``"""
    out = []
    own = part.upper()
    for c in conducting:
        if c.junction.part == own:
            continue
        what = c.junction.name if c.junction.part == c.junction.name else \
            f"{c.junction.name} (of {c.junction.part})"
        text = f"{what} conducts at about {format_value(c.volts, 'V', 2)} under the tester's drive"
        if inc.kind in ("diode", "diode-pair") and iso.kind not in ("diode", "diode-pair"):
            text += ": the reading becomes a junction"
        else:
            text += f" ({format_value(c.current, 'A', 2)})"
        out.append(text)
    return out


def share_reason(part: str, share: tuple[float, float, float] | None) -> str | None:
    """``"R3 carries 41 % of the probe current; the paths beside it the rest"``"""
    if share is None:
        return None
    frac, _, total = share
    if frac >= 1.0 - CURRENT_SHARE_SHOWN:
        return None
    return (f"{part} carries {frac * 100:.0f} % of the {format_value(total, 'A')} the probes "
            f"drive; the paths beside it carry the rest")


def sensitivity_reason(part: str, s: float | None, step: float, what: str = "value") -> str:
    """How strongly the reading follows the part."""
    if s is None:
        return f"the reading does not follow {part}'s {what}: no sensitivity can be given"
    return (f"a {step * 100:.0f} % change of {part}'s {what} moves the reading by "
            f"{abs(s) * step * 100:.1f} % (sensitivity {s:.2f})")
