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
import re
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
    return _join(labels)


def _join(labels: Sequence[str], most: int = 4) -> str:
    labels = list(labels)
    if len(labels) > most:
        labels = labels[:most - 1] + [f"{len(labels) - most + 1} more"]
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
        text += f": it discharges {name} with a time constant of {format_value(ohms * value, 's')}"
    elif kind == "D":
        text += ": it takes part of the current the junction would carry"
    return text


def _capacitor_reasons(paths: Sequence[Path], name: str, kind: str, value: float | None,
                       nets: tuple[str, str]) -> list[str]:
    """Direct parallel capacitors as one sum; the largest series chain; for a
    resistor the largest capacitance it must charge."""
    direct = [q for q in paths if len(q.parts) == 1 and q.capacitance is not None]
    chains = [q for q in paths if len(q.parts) > 1 and q.capacitance is not None]
    out = []
    if kind == "C" and direct:
        total = (value or 0.0) + sum(float(q.capacitance) for q in direct)  # type: ignore[arg-type]
        names = _join([q.links[0].label() if q.links else q.parts[0] for q in direct])
        verb = "shares" if len(direct) == 1 else "share"
        out.append(f"{names} {verb} nets {nets[0]} and {nets[1]} with {name}: the reading is "
                   f"their sum ({format_value(total, 'F')})")
    if kind == "C" and chains and value:
        big = max(chains, key=lambda q: float(q.capacitance))  # type: ignore[arg-type]
        if float(big.capacitance) >= 0.01 * value:  # type: ignore[arg-type]
            out.append(f"{_labels(big)} in series add {format_value(big.capacitance, 'F')} beside {name}")
    if kind == "R" and value and (direct or chains):
        big = max(direct + chains, key=lambda q: float(q.capacitance))  # type: ignore[arg-type]
        out.append(f"{_labels(big)} beside {name} must charge through it (time constant "
                   f"{format_value(value * float(big.capacitance), 's')})")  # type: ignore[arg-type]
    return out


def path_reasons(board: Board, part: str, probes: Sequence[str], iso: Reading, inc: Reading,
                 limit: int = 2) -> list[str]:
    """What the graph shows between the probed nets, most influential first:
    the ``limit`` lowest resistive paths (and the resistance of all of them
    together), capacitors in parallel (their sum) or to be charged, inductors
    as shorts. Junction and chip paths are told from the simulation instead."""
    p = board.part(part)
    nets = list(dict.fromkeys(probes))
    out: list[str] = []
    more: list[tuple[int, set, str, str]] = []
    for i, a in enumerate(nets):
        for b in nets[i + 1:]:
            found = between(board, a, b, without=(p.name,))
            if found.tied:
                out.append(f"nets {a} and {b} are tied by a part that acts as a wire: "
                           f"the tester sees a short across {p.name}")
                continue
            shown: list[str] = []
            resistive = sorted((q for q in found.paths if q.kind == "resistive"),
                               key=lambda q: q.dc_resistance or 0.0)
            shown += [_resistive(q, p.name, p.kind, p.value) for q in resistive[:limit]]
            rest = found.equivalent_resistance
            if len(resistive) > 1 and math.isfinite(rest):
                text = (f"together the resistors beside {p.name} measure "
                        f"{format_value(rest, 'ohm')} between {a} and {b}")
                if p.kind == "R" and p.value:
                    text += f"; with {p.name} {format_value(_parallel(p.value, rest), 'ohm')}"
                shown.append(text)
            shown += _capacitor_reasons([q for q in found.paths if q.kind == "capacitive"],
                                        p.name, p.kind, p.value, (a, b))
            inductive = [q for q in found.paths if q.kind == "inductive"]
            if inductive and p.kind != "L":
                shown.append(f"{_labels(inductive[0])} joins {a} and {b}: a short at DC beside {p.name}")
            out += shown
            others = len(found.paths) - len(resistive[:limit]) - (1 if inductive else 0) - sum(
                1 for q in found.paths if q.kind == "capacitive")
            if others > 0:
                more.append((others, {q.kind for q in found.paths} - {"resistive", "capacitive"}, a, b))
    if more:
        count = sum(m[0] for m in more)
        kinds = sorted(set().union(*(m[1] for m in more)))
        what = f" ({', '.join(kinds)})" if kinds else ""
        where = f"{more[0][2]} and {more[0][3]}" if len(more) == 1 else "the probed nets"
        out.append(f"{count} more paths{what} join {where}")
    if not out and iso.kind == inc.kind:
        out.append(f"nothing else on the board joins the probed nets of {p.name}")
    return out


def junction_label(j: Junction) -> str:
    """``"D6"``, ``"Q1 B-E"``, ``"XU1's protection diode at pin 2 (to its supply)"``
    (the names the pin-role models of unmodelled parts give their diodes)."""
    found = re.fullmatch(r"(.+)~P(\d+)~D([HLB])\d*", j.name)
    if found:
        side = {"H": " (to its supply)", "L": " (from its ground)", "B": ""}[found.group(3)]
        return f"{found.group(1)}'s protection diode at pin {found.group(2)}{side}"
    if re.fullmatch(r".+~S\d+~D\d+", j.name):
        return f"{j.part}'s diode from ground to supply"
    if j.part in (j.name, "") or j.name.startswith(j.part + " "):
        return j.name
    return f"a junction of {j.part} ({j.name})"


@dataclass(frozen=True)
class Conduction:
    """A junction's strongest conduction during the run: forward voltage,
    current and its share of the current the probes drove in that step."""

    junction: Junction
    volts: float
    current: float
    share: float


def _probe_current(step) -> float:
    """Current the driven probes pushed into the board during ``step`` (A)."""
    total = 0.0
    for src, v in zip(step.drive, step.result.volts):
        if src is not None and src.resistance > 0:
            total += max(0.0, (src.volts - v) / src.resistance)
    return total


def conducting_junctions(board: Board, run, minimum: float = CONDUCTING_CURRENT,
                         share: float = CURRENT_SHARE_SHOWN) -> list[Conduction]:
    """Junctions that carried at least ``minimum`` amperes and ``share`` of
    the probe current at the end of some step of ``run`` (from the net
    voltages the engine reported and Shockley's law)."""
    best: dict[str, Conduction] = {}
    js = junctions(elements(board))
    for step in getattr(run, "steps", ()):
        nets = step.result.nets
        total = _probe_current(step)
        if total <= 0:
            continue
        for j in js:
            if j.anode not in nets or j.cathode not in nets:
                continue
            v = float(nets[j.anode]) - float(nets[j.cathode])
            i = j.current(v)
            frac = min(i / total, 1.0)
            if i >= minimum and frac >= share and (j.name not in best or i > best[j.name].current):
                best[j.name] = Conduction(j, v, i, frac)
    return sorted(best.values(), key=lambda c: -c.current)


def current_share(board: Board, part: str, run) -> tuple[float, float, float] | None:
    """(share of the probe current through ``part``, that current, probe
    current) in the step where the part carried the most current, for a
    resistor or a diode, whose current follows from its pins' voltages."""
    p = board.part(part)
    if p.kind not in ("R", "D") or len(p.pins) != 2:
        return None
    js = list(junctions(elements(board.only(p.name)))) if p.kind == "D" else []
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
            i = max(js[0].current(v), 0.0) if js else 0.0
        if best is None or i > best[1]:
            best = (min(i / total, 1.0), i, total)
    return best


def junction_reasons(conducting: Iterable[Conduction], part: str, iso: Reading, inc: Reading,
                     limit: int = 3) -> list[str]:
    """``"D2 conducts at about 0.6 V under the tester's drive: ..."``, the
    ``limit`` strongest, then how many more."""
    out = []
    own = part.upper()
    others = [c for c in conducting if c.junction.part != own]
    for c in others[:limit]:
        text = (f"{junction_label(c.junction)} conducts at about {format_value(c.volts, 'V', 2)} "
                f"under the tester's drive")
        if inc.kind in ("diode", "diode-pair") and iso.kind not in ("diode", "diode-pair"):
            text += ": the reading becomes a junction"
        else:
            text += f", taking {c.share * 100:.0f} % of the probe current"
        out.append(text)
    if len(others) > limit:
        out.append(f"{len(others) - limit} more junctions conduct under the tester's drive")
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
