"""A finished survey: the records in board order, coverage and counts.

Fault coverage is the share of (part, fault) pairs whose fault shows in
circuit (the faulted reading leaves the healthy band), counted over the
parts that were surveyed (status "ok"); parts that failed or are not yet
supported are counted apart and named, never silently dropped.

>>> s = Survey("b", None, "analytic", "generic", "quick", [
...     {"part": "R1", "status": "ok", "verdict": "reliable", "faults_detectable": 4, "faults_total": 4},
...     {"part": "C1", "status": "ok", "verdict": "masked", "faults_detectable": 1, "faults_total": 6},
...     {"part": "Q1", "status": "unsupported", "verdict": "unsupported"}])
>>> s.coverage()["share"], s.counts()["masked"], s.coverage()["parts_not_counted"]
(0.5, 1, ['Q1'])
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from typing import Sequence

from ..model import Board
from ..safety import CAUTIONS
from .part import VERDICT_ORDER, PartResult
from .settings import Settings

__all__ = ["Survey", "coverage_of", "SCHEMA"]

#: Version of the survey.json layout (docs/survey.md).
SCHEMA = 1


def coverage_of(records: Sequence[dict]) -> dict:
    """``{"detectable", "faults", "share", "parts_counted", "parts_not_counted"}``."""
    counted = [r for r in records if r.get("status") == "ok"]
    detectable = sum(int(r.get("faults_detectable") or 0) for r in counted)
    faults = sum(int(r.get("faults_total") or 0) for r in counted)
    return {"detectable": detectable, "faults": faults,
            "share": detectable / faults if faults else None,
            "parts_counted": len(counted),
            "parts_not_counted": [r["part"] for r in records if r.get("status") != "ok"]}


@dataclass
class Survey:
    """Everything a survey found; ``traces`` (part -> waveforms) feed the plots."""

    board: str
    file: str | None
    engine: str
    tester: str
    depth: str
    records: list[dict]
    traces: dict = field(default_factory=dict)
    what_if: dict | None = None

    @classmethod
    def of(cls, board: Board, profile, settings: Settings, results: Sequence[PartResult]) -> "Survey":
        return cls(board.name, os.path.basename(board.path) if board.path else None,
                   settings.engine, str(getattr(profile, "instrument_name", "tester")),
                   settings.describe(), [r.record for r in results],
                   {r.record["part"]: r.traces for r in results if r.traces})

    def coverage(self) -> dict:
        return coverage_of(self.records)

    def counts(self) -> dict[str, int]:
        """Parts per verdict (every verdict named, zero when none)."""
        out = {v: 0 for v in VERDICT_ORDER}
        for r in self.records:
            key = str(r.get("verdict"))
            out[key] = out.get(key, 0) + 1
        return out

    def masked(self) -> list[dict]:
        """The masked parts with their remedy, in board order."""
        return [{"part": r["part"], "remedy": r.get("remedy")} for r in self.records
                if r.get("verdict") == "masked"]

    def verdicts(self) -> dict[str, str]:
        return {r["part"]: str(r.get("verdict")) for r in self.records}

    def to_dict(self) -> dict:
        """The survey.json object (layout: docs/survey.md)."""
        return {
            "schema": SCHEMA,
            "board": self.board,
            "file": self.file,
            "engine": self.engine,
            "tester": self.tester,
            "depth": self.depth,
            "coverage": self.coverage(),
            "counts": self.counts(),
            "masked": self.masked(),
            "what_if": self.what_if,
            "cautions": list(CAUTIONS),
            "parts": self.records,
        }
