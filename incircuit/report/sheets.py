"""survey.json and readings.csv: the machine-readable survey and the expected-readings sheet.

Both are plain text, byte-identical for the same survey (no dates, no
absolute paths, no timings). Numbers in the CSV are SI values with six
significant digits; the ``*_text`` columns repeat them for people.

>>> rec = {"part": "R1", "kind": "R", "value": 1000.0, "unit": "ohm", "probes": ["A", "B"],
...        "in_circuit": {"kind": "resistor", "value": 500.0, "unit": "ohm", "extra": {}},
...        "isolated": {"kind": "resistor", "value": 1000.0, "unit": "ohm", "extra": {}},
...        "band": {"low": 480.0, "high": 520.0, "source": "tolerance"}, "verdict": "predictable",
...        "status": "ok", "faults_detectable": 4, "faults_total": 4}
>>> print(readings_csv({"parts": [rec]}).splitlines()[1])
R1,R,1000,ohm,A,B,,resistor,500,ohm,resistor 500 ohm,480,520,tolerance,resistor,1000,ohm,predictable,,4,4,,
"""

from __future__ import annotations

import csv
import io
import json
import math
from typing import Mapping

from ..units import format_value

__all__ = ["survey_json", "readings_csv", "CSV_COLUMNS", "reading_words"]

#: Columns of readings.csv, in order.
CSV_COLUMNS = (
    "part", "kind", "value", "unit", "probe1", "probe2", "probe3",
    "expected_kind", "expected_value", "expected_unit", "expected_text",
    "band_low", "band_high", "band_source",
    "isolated_kind", "isolated_value", "isolated_unit",
    "verdict", "sensitivity", "faults_detectable", "faults_total", "remedy", "error",
)


def survey_json(data: Mapping) -> str:
    """``data`` (a survey's ``to_dict()``) as indented JSON with a final newline."""
    return json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def _number(value: object) -> str:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return ""
    if isinstance(value, float) and not math.isfinite(value):
        return ""
    return format(float(value), ".6g")


def reading_words(reading: Mapping | None) -> str:
    """``{"kind": "resistor", "value": 500.0, "unit": "ohm"}`` -> ``"resistor 500 ohm"``."""
    if not reading:
        return ""
    value = reading.get("value")
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return f"{reading.get('kind')} {format_value(float(value), reading.get('unit'))}"
    return str(reading.get("kind") or "")


def readings_csv(data: Mapping) -> str:
    """The expected-readings sheet: one row per part of ``data["parts"]``."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(CSV_COLUMNS)
    for r in data.get("parts", ()):
        probes = list(r.get("probes") or []) + ["", "", ""]
        inc = r.get("in_circuit") or {}
        iso = r.get("isolated") or {}
        band = r.get("band") or {}
        error = r.get("error") or {}
        remedy = r.get("remedy") or {}
        writer.writerow([
            r.get("part"), r.get("kind"), _number(r.get("value")), r.get("unit") or "",
            probes[0], probes[1], probes[2],
            inc.get("kind") or "", _number(inc.get("value")), inc.get("unit") or "", reading_words(inc),
            _number(band.get("low")), _number(band.get("high")), band.get("source") or "",
            iso.get("kind") or "", _number(iso.get("value")), iso.get("unit") or "",
            r.get("verdict") or "", _number(r.get("sensitivity")),
            r.get("faults_detectable", "") if r.get("status") == "ok" else "",
            r.get("faults_total", "") if r.get("status") == "ok" else "",
            remedy.get("title") or "", error.get("message") or "",
        ])
    return out.getvalue()
