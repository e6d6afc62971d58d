"""Designer remedies: what to change on the board so a masked part can be checked in place.

The judge's lift plan has already predicted, for each single leg that could
be lifted, the verdict the part would then reach. A design change that
opens the same connection on demand has the same effect, so the remedy is
chosen from the best lift that un-masks the part, by what it separates:

* the part reads in circuit **as it reads alone** (nothing beside it, or
  nothing that changes the reading), yet the reading hardly follows it: the
  tester cannot resolve it (a fuse or a ferrite bead of a fraction of an
  ohm); no board change helps, a *bench instrument* does;
* a **neighbour** whose leg un-masks the part: the neighbour masks it.

  - an unmodelled chip: a *series resistor* between that chip pin and the
    shared net, so the chip's protection diodes no longer clamp the
    tester's drive;
  - a resistor straight across a capacitor under test: *move the bleeder*
    behind a link that can be opened (or to the far side of a part that can);
  - anything else: a *zero-ohm link* in the neighbour's leg, opened for testing;

* only one of the part's **own** legs helps (it is masked by several parts
  at once): a *test pad on the far side* of a zero-ohm link in that leg,
  so the link can be opened and the part probed from the pad;
* no single lift helps: test pads and links on both legs, or plan to lift it.

Each remedy carries the verdict and reading the lift plan predicted for it.
Which kind of path the neighbour sits on comes from the board graph
(:func:`incircuit.graph.between`).

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("C1", "C", ("A", "B"), 1e-6), Part("R1", "R", ("A", "B"), 100.0)))
>>> lift = [{"part": "C1", "leg": 1, "net": "A", "own": True, "verdict": "reliable", "reading": None},
...         {"part": "R1", "leg": 1, "net": "A", "own": False, "verdict": "reliable", "reading": None}]
>>> rec = {"verdict": "masked", "lift": lift, "isolated": {"kind": "capacitor", "value": 1e-6},
...        "in_circuit": {"kind": "resistor", "value": 100.0}}
>>> remedy_for(b, "C1", ("A", "B"), rec)["kind"]
'bleeder'
"""

from __future__ import annotations

from typing import Mapping, Sequence

from ..graph import between
from ..model import Board, Part
from ..units import format_value

__all__ = ["remedy_for", "REMEDY_KINDS", "REMEDY_TITLES"]

#: Remedy kinds, in the order a summary lists them.
REMEDY_KINDS = ("series-resistor", "bleeder", "link", "test-pad", "instrument", "none")

#: An in-circuit reading within this fraction of the isolated one (same
#: kind) counts as "reads as alone": the board adds nothing to it.
SAME_READING = 0.02

#: Short titles for tables.
REMEDY_TITLES = {
    "series-resistor": "series resistor at a chip pin",
    "bleeder": "move the bleeder",
    "link": "zero-ohm link in a neighbour",
    "test-pad": "test pad on the far side",
    "instrument": "beyond the tester: use a bench instrument",
    "none": "no single change found",
}

_UNITS = {"R": "ohm", "C": "F", "L": "H"}


def _label(part: Part) -> str:
    unit = _UNITS.get(part.kind)
    if unit and part.value is not None:
        return f"{part.name} ({format_value(part.value, unit)})"
    if part.model:
        return f"{part.name} ({part.model})"
    return part.name


def _beside(board: Board, part: str, probes: Sequence[str]) -> int:
    """How many paths join the probed nets besides the part itself."""
    nets = list(dict.fromkeys(probes))
    return sum(len(between(board, a, b, without=(part,)).paths)
               for i, a in enumerate(nets) for b in nets[i + 1:])


def _reads_as_alone(record: Mapping) -> bool:
    iso, inc = record.get("isolated") or {}, record.get("in_circuit") or {}
    if not iso or not inc or iso.get("kind") != inc.get("kind"):
        return False
    a, b = iso.get("value"), inc.get("value")
    if a is None and b is None:
        return True
    if not isinstance(a, (int, float)) or not isinstance(b, (int, float)) or not a:
        return False
    return abs(b / a - 1.0) <= SAME_READING


def _outcome(lift: Mapping) -> str:
    reading = lift.get("reading")
    shown = ""
    if isinstance(reading, Mapping) and reading.get("kind"):
        value = reading.get("value")
        shown = str(reading["kind"])
        if isinstance(value, (int, float)):
            shown += f" {format_value(float(value), reading.get('unit'))}"
    verdict = str(lift.get("verdict"))
    return f"{verdict} ({shown})" if shown else verdict


def remedy_for(board: Board, part: str, probes: Sequence[str], record: Mapping) -> dict | None:
    """The design change that would let ``part`` be checked in place.

    ``record`` is the part's survey record: ``verdict``, ``isolated`` and
    ``in_circuit`` readings and the judge's ranked ``lift`` plan as dicts
    (``part``, ``leg``, ``net``, ``own``, ``verdict``, ``reading``). None
    unless the verdict is "masked". Returns ``{"kind", "title", "text",
    "part", "leg", "net", "expected_verdict", "expected"}`` (``part``,
    ``leg``, ``net``: where the change goes; None when no board change helps).
    """
    if record.get("verdict") != "masked":
        return None
    p = board.part(part)
    lift: Sequence[Mapping] = record.get("lift") or ()
    if _reads_as_alone(record):
        beside = _beside(board, p.name, probes)
        where = "nothing else joins its nets" if not beside else "its neighbours do not change it"
        text = (f"{p.name} reads in circuit as alone ({where}), but the tester cannot resolve a "
                f"change of it: no board change helps; check it with a bench instrument")
        return {"kind": "instrument", "title": REMEDY_TITLES["instrument"], "text": text,
                "part": None, "leg": None, "net": None, "expected_verdict": None, "expected": None}
    helpful = [x for x in lift if x.get("verdict") in ("reliable", "predictable")]
    neighbours = [x for x in helpful if not x.get("own")]
    own = [x for x in helpful if x.get("own")]
    # a neighbour that reaches "reliable" beats one that reaches "predictable"
    neighbours.sort(key=lambda x: x.get("verdict") != "reliable")
    if neighbours:
        best = neighbours[0]
        other = board.part(str(best["part"]))
        leg, net = int(best["leg"]), str(best["net"])
        if other.kind == "X":
            kind = "series-resistor"
            text = (f"series resistor (a few hundred ohms to a few kohm, as the signal allows) between "
                    f"{other.name} pin {leg} and net {net}, so the chip's protection diodes stop "
                    f"clamping the tester")
        elif other.kind == "R" and p.kind == "C" and set(other.pins) == set(p.pins):
            kind = "bleeder"
            text = f"move bleeder {_label(other)} from across {p.name} to behind a zero-ohm link that can be opened"
        else:
            kind = "link"
            text = f"zero-ohm link in {_label(other)} leg {leg} (net {net}), opened for testing"
        text += f"; then {p.name} reads {_outcome(best)}"
        return {"kind": kind, "title": REMEDY_TITLES[kind], "text": text, "part": other.name,
                "leg": leg, "net": net, "expected_verdict": best.get("verdict"),
                "expected": best.get("reading")}
    if own:
        best = own[0]
        leg, net = int(best["leg"]), str(best["net"])
        others = [n for n in dict.fromkeys(probes) if n != net]
        far = f" and net {others[0]}" if others else ""
        text = (f"zero-ohm link in {p.name} leg {leg} (net {net}) with a test pad on {p.name}'s side; "
                f"open it and probe the pad{far}: {p.name} then reads {_outcome(best)} "
                f"(no single neighbour change un-masks it)")
        return {"kind": "test-pad", "title": REMEDY_TITLES["test-pad"], "text": text,
                "part": p.name, "leg": leg, "net": net, "expected_verdict": best.get("verdict"),
                "expected": best.get("reading")}
    text = f"no single change found: test pads and links on both legs of {p.name}, or desolder it to test"
    return {"kind": "none", "title": REMEDY_TITLES["none"], "text": text, "part": None,
            "leg": None, "net": None, "expected_verdict": None, "expected": None}
