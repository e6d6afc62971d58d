"""Why a transistor reads differently in circuit: its bias network, in closed form.

The tester feeds a base or gate through its high resistor (about 470 kohm,
a few microamps); the parts a board puts around a transistor change that
small drive first:

* a **base-emitter resistance** ``R_BE`` (the resistors between the base and
  emitter nets, as one DC resistance) takes ``Vbe / R_BE`` of the
  ``(Vs - Vbe) / R_high`` the tester feeds the base (Kirchhoff's current law
  at the base; Horowitz & Hill, *The Art of Electronics*, 3rd ed., ch. 2).
  When it takes all of it the transistor stays off; otherwise the gain
  reads about ``hFE (1 - Vbe / (R_BE Ib))``;
* a **gate-source resistance** ``R_GS`` makes the gate's charging source a
  divider: the gate can reach only ``Vs R_GS / (R_GS + R_high)``. Below the
  threshold the channel never turns on; above it the gate gets there later
  (through ``R_high || R_GS``), and the tester, timing as if the bare
  resistor charged the gate, reads a larger gate capacitance;
* anything between collector and emitter (drain and source) adds its own
  current to the one the gain or threshold step looks for.

:func:`transistor_reasons` turns these into sentences with the numbers;
:func:`pins_reason` says when the pins found in circuit are not the part's.

>>> from incircuit.model import Board, Model, Part, Reading
>>> q = Model("QN", "NPN", {"bf": 200.0})
>>> b = Board("t", (Part("Q1", "Q", ("C", "B", "E"), model="QN"), Part("R1", "R", ("B", "E"), 47e3)), {"QN": q})
>>> iso = Reading("bjt-npn", 200.0, extra={"vbe": 0.65, "pins": {"B": 2, "C": 1, "E": 3}})
>>> print(transistor_reasons(b, "Q1", iso, 5.0, 470e3)[0])
R1 (47 kohm) between base and emitter takes Vbe / R_BE = 650 mV / 47 kohm = 13.8 uA of the (5 V - 650 mV) / 470 kohm = 9.26 uA the tester feeds the base: none is left for Q1, which stays off
"""

from __future__ import annotations

import math

from ..graph import between
from ..model import Board, Reading
from ..units import format_value

__all__ = ["transistor_reasons", "pins_reason", "stolen_base_current", "gate_divider", "DEFAULT_VBE"]

#: Base-emitter voltage assumed when the part's own reading gives none: a
#: silicon junction at microamps to milliamps (common practice, 0.6-0.7 V).
DEFAULT_VBE = 0.65
#: Gate threshold assumed when neither the reading nor the model gives one
#: (SPICE level 1 default vto is 0; a logic-level part is about 1-2 V, from memory).
DEFAULT_VTH = 1.5


def stolen_base_current(vbe: float, r_be: float, vs: float, r_high: float) -> tuple[float, float]:
    """``(Vbe / R_BE, (Vs - Vbe) / R_high)``: what a base-emitter resistance takes
    and what the tester feeds the base (A).

    >>> [round(x * 1e6, 2) for x in stolen_base_current(0.65, 47e3, 5.0, 470e3)]
    [13.83, 9.26]
    """
    return vbe / r_be, (vs - vbe) / r_high


def gate_divider(r_gs: float, vs: float, r_high: float) -> tuple[float, float]:
    """``(V_end, R_th)``: the voltage the gate charges towards and through what,
    with ``R_GS`` from gate to source (Thevenin, Horowitz & Hill ch. 1).

    >>> v, r = gate_divider(100e3, 5.0, 470e3)
    >>> round(v, 3), round(r)
    (0.877, 82456)
    """
    return vs * r_gs / (r_gs + r_high), r_gs * r_high / (r_gs + r_high)


def _names(board: Board, part: str, a: str, b: str) -> tuple[str, float, bool]:
    """The resistive paths between nets ``a`` and ``b`` in words, their DC
    resistance, and whether there are several."""
    found = between(board, a, b, without=(part,))
    paths = [p for p in found.paths if p.kind == "resistive"]
    labels = []
    for path in paths[:3]:
        words = [k.label() for k in path.links] or list(path.parts)
        labels.append(" + ".join(words))
    text = ", ".join(labels) if labels else "the resistors"
    if len(paths) > 3:
        text += f" and {len(paths) - 3} more"
    return text, found.equivalent_resistance, len(paths) != 1


def _others(board: Board, part: str, a: str, b: str, what: str) -> list[str]:
    """Non-resistive paths between two pins' nets, in one sentence."""
    found = between(board, a, b, without=(part,))
    kinds = [p for p in found.paths if p.kind != "resistive"]
    if not kinds:
        return []
    shown = "; ".join(f"{', '.join(p.parts)} ({p.kind})" for p in kinds[:3])
    return [f"between {what} lie {shown}: their current adds to the one the tester measures"]


def _probe_high_ohms(iso: Reading, pin: str, default_probe: int, r_high: float | dict) -> float:
    if isinstance(r_high, dict):
        pins = iso.extra.get("pins")
        probe = pins.get(pin, default_probe) if isinstance(pins, dict) else default_probe
        return float(r_high.get(probe, r_high[default_probe]))
    return float(r_high)


def _bjt(board: Board, part: str, iso: Reading, vs: float, r_high) -> list[str]:
    p = board.part(part)
    c, b, e = p.pins[:3]
    out = []
    text, r_be, many = _names(board, p.name, b, e)
    vbe = iso.extra.get("vbe") if iso.kind.startswith("bjt") else None
    vbe = float(vbe) if isinstance(vbe, (int, float)) and vbe > 0 else DEFAULT_VBE
    rh = _probe_high_ohms(iso, "B", 2, r_high)
    if math.isfinite(r_be):
        stolen, drive = stolen_base_current(vbe, r_be, vs, rh)
        head = (f"{text} between base and emitter {'take' if many else 'takes'} Vbe / R_BE = {format_value(vbe, 'V')} / "
                f"{format_value(r_be, 'ohm')} = {format_value(stolen, 'A')} of the "
                f"({format_value(vs, 'V')} - {format_value(vbe, 'V')}) / {format_value(rh, 'ohm')} = "
                f"{format_value(drive, 'A')} the tester feeds the base")
        if stolen >= drive:
            out.append(head + f": none is left for {p.name}, which stays off")
        else:
            left = 1.0 - stolen / drive
            tail = f": {left * 100:.0f} % is left for {p.name}"
            if iso.kind.startswith("bjt") and iso.value:
                tail += f", so the gain reads about {iso.value * left:.0f} instead of {iso.value:.0f}"
            out.append(head + tail)
    out += _others(board, p.name, c, e, "collector and emitter")
    return out


def _mosfet(board: Board, part: str, iso: Reading, vs: float, r_high) -> list[str]:
    p = board.part(part)
    d, g, s = p.pins[:3]
    out = []
    text, r_gs, many = _names(board, p.name, g, s)
    rh = _probe_high_ohms(iso, "G", 2, r_high)
    vth = abs(iso.value) if iso.kind.startswith("mosfet") and iso.value is not None else None
    if vth is None:
        model = board.models.get(p.model or "")
        vto = float(model.params.get("vto", 0.0)) if model is not None else 0.0
        vth = abs(vto) or DEFAULT_VTH
    if math.isfinite(r_gs):
        v_end, r_th = gate_divider(r_gs, vs, rh)
        head = (f"{text} between gate and source {'make' if many else 'makes'} the tester's gate drive a divider: the gate "
                f"charges towards {format_value(vs, 'V')} x {format_value(r_gs, 'ohm')} / "
                f"({format_value(r_gs, 'ohm')} + {format_value(rh, 'ohm')}) = {format_value(v_end, 'V')}")
        if v_end <= vth:
            out.append(head + f", below the threshold of {format_value(vth, 'V')}: {p.name} never turns on")
        else:
            slow = (r_th * math.log(v_end / (v_end - vth))) / (rh * math.log(vs / (vs - vth)))
            out.append(head + f" through {format_value(r_th, 'ohm')}: it reaches the threshold of "
                              f"{format_value(vth, 'V')} {slow:.1f} times later, and the gate capacitance "
                              f"reads that much larger")
    out += _others(board, p.name, g, s, "gate and source")
    out += _others(board, p.name, d, s, "drain and source")
    return out


def transistor_reasons(board: Board, part: str, iso: Reading, vs: float, r_high: float | dict) -> list[str]:
    """Sentences on the part's bias network (empty for other kinds).

    ``vs`` is the tester's supply, ``r_high`` its high resistor (ohm) including
    the port pin, or a map probe number -> that resistance.
    """
    p = board.part(part)
    if p.kind == "Q" and len(p.pins) >= 3:
        return _bjt(board, p.name, iso, vs, r_high)
    if p.kind == "M" and len(p.pins) >= 3:
        return _mosfet(board, p.name, iso, vs, r_high)
    return []


def pins_reason(iso: Reading, inc: Reading) -> str | None:
    """Why the reading cannot judge the part when the pins found differ
    (None when they agree).

    >>> a = Reading("bjt-npn", 150.0, extra={"pins": {"B": 2, "C": 1, "E": 3}})
    >>> b = Reading("bjt-npn", 31.0, extra={"pins": {"B": 2, "C": 3, "E": 1}})
    >>> pins_reason(a, b)
    'in circuit the tester finds the pins as B=2 C=3 E=1 instead of B=2 C=1 E=3'
    """
    a, b = iso.extra.get("pins"), inc.extra.get("pins")
    if iso.kind != inc.kind or not isinstance(a, dict) or not isinstance(b, dict) or a == b:
        return None
    if iso.extra.get("drain_source_interchangeable") and a.get("G") == b.get("G"):
        return None  # a JFET's channel is symmetric: D and S either way round
    def words(pins: dict) -> str:
        return " ".join(f"{k}={v}" for k, v in pins.items())
    return f"in circuit the tester finds the pins as {words(b)} instead of {words(a)}"
