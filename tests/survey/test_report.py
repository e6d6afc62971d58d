"""Report files: self-contained HTML, the expected-readings sheet, JSON, plots, atomic writes.

"Self-contained" is checked with Python's own HTML parser (html.parser):
no element may load anything from elsewhere. CSV is read back with the
standard csv module, JSON with json (RFC 8259: no NaN).
"""

from __future__ import annotations

import csv
import io
import json
import os
import re
from html.parser import HTMLParser
from pathlib import Path

import pytest

from incircuit.report import CSV_COLUMNS, write_report
from incircuit.report import files as files_module
from incircuit.report.files import write_atomic
from incircuit.report.html import embed_svg, render_html
from incircuit.report.plots import trace_svg
from incircuit.survey import survey


class _Loads(HTMLParser):
    """Every attribute that would make a browser fetch something."""

    def __init__(self):
        super().__init__()
        self.loads: list[tuple[str, str, str]] = []
        self.tags: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        for key, value in attrs:
            if key in ("src", "href", "xlink:href", "data", "poster") and value and not value.startswith("#"):
                self.loads.append((tag, key, value))
            if tag == "link":
                self.loads.append((tag, key, value or ""))


def _files(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())}


@pytest.fixture(scope="module")
def report(masked_survey, tmp_path_factory):
    folder = tmp_path_factory.mktemp("report")
    write_report(folder, masked_survey.to_dict(), masked_survey.traces)
    return folder


def test_three_files_and_no_leftovers(report):
    assert sorted(p.name for p in report.iterdir()) == ["readings.csv", "report.html", "survey.json"]


def test_html_is_self_contained(report):
    page = (report / "report.html").read_text(encoding="utf-8")
    parser = _Loads()
    parser.feed(page)
    assert parser.loads == []
    assert "script" in parser.tags and "style" in parser.tags and "svg" in parser.tags
    assert not re.search(r"@import|url\((?!#)", page)  # no style sheet or font from elsewhere
    assert "http://" not in page.replace("http://www.w3.org/", "")  # only SVG namespaces


def test_html_has_a_row_per_part_cautions_and_no_date(report, masked_survey):
    page = (report / "report.html").read_text(encoding="utf-8")
    assert page.count('<tbody class="part"') == len(masked_survey.records)
    for caution in masked_survey.to_dict()["cautions"]:
        assert caution.replace("'", "&#x27;") in page
    assert not re.search(r"\b20\d\d-\d\d-\d\d\b", page)  # date-free: same inputs, same bytes


def test_plot_ids_are_unique_on_the_page(report):
    page = (report / "report.html").read_text(encoding="utf-8")
    ids = re.findall(r'\sid="([^"]+)"', page)
    assert len(ids) == len(set(ids))
    for ref in re.findall(r"url\(#([^)]+)\)", page):
        assert ref in ids


def test_csv_sheet_has_a_row_per_part(report, masked_survey):
    rows = list(csv.DictReader(io.StringIO((report / "readings.csv").read_text(encoding="utf-8"))))
    assert tuple(rows[0].keys()) == CSV_COLUMNS
    assert [r["part"] for r in rows] == [r["part"] for r in masked_survey.records]
    r1 = rows[0]
    rec = masked_survey.records[0]
    assert (r1["probe1"], r1["probe2"]) == tuple(rec["probes"])
    assert float(r1["expected_value"]) == pytest.approx(rec["in_circuit"]["value"], rel=1e-5)  # 6 digits
    assert float(r1["band_low"]) <= float(r1["expected_value"]) <= float(r1["band_high"])
    assert r1["verdict"] == rec["verdict"] and r1["isolated_kind"] == rec["isolated"]["kind"]


def test_json_is_strict(report):
    text = (report / "survey.json").read_text(encoding="utf-8")
    json.loads(text, parse_constant=lambda name: pytest.fail(f"{name} in survey.json"))


def test_same_inputs_give_byte_identical_files(tb, profile, tmp_path):
    # two independent surveys of the same board, plots included
    for name in ("a", "b"):
        s = survey(tb.board(tb.MASKED), profile, tb.QUICK)
        write_report(tmp_path / name, s.to_dict(), s.traces)
    assert _files(tmp_path / "a") == _files(tmp_path / "b")


def test_svg_is_deterministic_and_dateless():
    steps = [{"name": "conduction 1->2 (low resistor)", "duration": 1e-3, "x": [0.0, 0.5, 1.0],
              "v": [[0.0, 0.0], [4.0, 0.1], [4.5, 0.1]]},
             {"name": "discharge (low)", "duration": 2e-5, "x": [0.0, 1.0], "v": [[4.5, 0.1], [0.0, 0.0]]}]
    a, b = trace_svg(steps, steps, "R1", ("A", "B")), trace_svg(steps, None, "R1", ("A", "B"))
    assert a == trace_svg(steps, steps, "R1", ("A", "B"))
    assert "<dc:date>" not in a and a.startswith("<svg")
    assert "probe 1 (A)" in a and "no run" in b


def test_embedded_svgs_get_their_own_ids():
    svg = '<svg width="10pt" height="5pt" viewBox="0 0 10 5"><defs><clipPath id="p1"/></defs><g clip-path="url(#p1)"/><use xlink:href="#p1"/></svg>'
    out = embed_svg(svg, "x-")
    assert 'id="x-p1"' in out and "url(#x-p1)" in out and 'href="#x-p1"' in out
    assert 'width="10pt"' not in out and 'viewBox="0 0 10 5"' in out


def test_failed_write_keeps_the_old_file_and_leaves_no_temporary(tmp_path, monkeypatch):
    target = tmp_path / "survey.json"
    write_atomic(target, "old\n")

    def broken(src, dst):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(files_module.os, "replace", broken)
    with pytest.raises(OSError):
        write_atomic(target, "new\n")
    assert target.read_text() == "old\n"
    assert os.listdir(tmp_path) == ["survey.json"]


def test_error_rows_show_their_error():
    data = {"board": "b", "coverage": {"share": None, "detectable": 0, "faults": 0, "parts_counted": 0,
            "parts_not_counted": ["R1"]}, "counts": {"error": 1},
            "parts": [{"part": "R1", "kind": "R", "status": "error", "verdict": "error", "probes": ["A", "B"],
                       "error": {"type": "EngineError", "message": "solver <gave> up", "hint": "try ngspice"}}]}
    page = render_html(data)
    assert "solver &lt;gave&gt; up" in page and "try ngspice" in page
    assert 'data-verdict="error"' in page


def test_plots_over_processes_are_the_same_bytes(masked_survey, tmp_path):
    write_report(tmp_path / "one", masked_survey.to_dict(), masked_survey.traces, jobs=1)
    write_report(tmp_path / "two", masked_survey.to_dict(), masked_survey.traces, jobs=2)
    assert _files(tmp_path / "one") == _files(tmp_path / "two")
