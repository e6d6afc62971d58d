"""The survey and demo commands as a user runs them: files, --json, what-if, errors, progress."""

from __future__ import annotations

import io
import json
import sys

import pytest

from incircuit.cli import main
from incircuit.commands import demo as demo_command
from incircuit.commands.survey import default_out


@pytest.fixture(scope="module")
def masked_cir(tmp_path_factory):
    folder = tmp_path_factory.mktemp("boards")
    path = folder / "masked.cir"
    path.write_text("Masked resistor and a bleeder across a capacitor\nR1 A B 10k ; tol=1%\n"
                    "R2 A B 100 ; tol=1%\nC1 C 0 100n ; tol=10%\nRB C 0 100 ; tol=5%\nR5 B C 47k ; tol=5%\n")
    return path


def test_json_prints_survey_json_and_nothing_else(masked_cir, tmp_path, capsys):
    assert main(["survey", str(masked_cir), "--out", str(tmp_path), "--json", "--depth", "quick"]) == 0
    out, err = capsys.readouterr()
    assert out == (tmp_path / "survey.json").read_text(encoding="utf-8")
    data = json.loads(out)
    assert data["file"] == "masked.cir" and len(data["parts"]) == 5
    assert err == ""


def test_text_summary_names_coverage_remedies_report_and_cautions(masked_cir, tmp_path, capsys):
    assert main(["survey", str(masked_cir), "--out", str(tmp_path / "r"), "--depth", "quick"]) == 0
    out = capsys.readouterr().out
    assert "Fault coverage:" in out and "(part, fault) pairs" in out
    assert "R1" in out and "zero-ohm link" in out
    assert str(tmp_path / "r" / "report.html") in out
    assert "Safety:" in out and "Disconnect all power" in out


def test_what_if_reports_both_coverages(masked_cir, tmp_path, capsys):
    args = ["survey", str(masked_cir), "--out", str(tmp_path), "--depth", "quick", "--lift", "R2:1", "--json"]
    assert main(args) == 0
    w = json.loads(capsys.readouterr().out)["what_if"]
    assert w["coverage_after"]["share"] > w["coverage_before"]["share"]
    assert {"part": "R1", "before": "masked", "after": "reliable"} in w["changed"]


@pytest.mark.parametrize("extra, words", [
    (["--lift", "R9:1"], "no part 'R9'"), (["--set", "R1=4K7"], "RKM"), (["--jobs", "0"], "--jobs"),
])
def test_bad_input_is_one_line_and_exit_2(masked_cir, tmp_path, capsys, extra, words):
    assert main(["survey", str(masked_cir), "--out", str(tmp_path), *extra]) == 2
    err = capsys.readouterr().err
    assert words in err and err.count("\n") == 1 and "Traceback" not in err


def test_missing_board_and_unwritable_out(masked_cir, tmp_path, capsys):
    assert main(["survey", str(tmp_path / "none.cir")]) == 2
    blocker = tmp_path / "file"
    blocker.write_text("x")
    assert main(["survey", str(masked_cir), "--out", str(blocker), "--depth", "quick"]) == 2
    err = capsys.readouterr().err
    assert "none.cir" in err and "must be a folder" in err


def test_default_out_is_named_after_the_netlist():
    assert str(default_out("boards/amp.cir")) == "incircuit-survey/amp"
    assert str(default_out("amp.cir", what_if=True)) == "incircuit-survey/amp-what-if"


def test_progress_bar_on_a_terminal_only(masked_cir, tmp_path, monkeypatch, capsys):
    class Terminal(io.StringIO):
        def isatty(self):
            return True

    term = Terminal()
    monkeypatch.setattr(sys, "stderr", term)
    assert main(["survey", str(masked_cir), "--out", str(tmp_path), "--depth", "quick"]) == 0
    assert "surveyed" in term.getvalue()
    term.truncate(0)
    assert main(["survey", str(masked_cir), "--out", str(tmp_path), "--depth", "quick", "--json"]) == 0
    assert term.getvalue().strip("\x00") == ""  # quiet with --json
    capsys.readouterr()


def test_demo_writes_its_report_into_the_folder(masked_cir, tmp_path, monkeypatch, capsys):
    # the demo's own board takes tens of seconds; its wiring is checked on a small board
    monkeypatch.setattr(demo_command, "resolve_board", lambda name: (str(masked_cir), ()))
    assert main(["demo", str(tmp_path / "demo"), "--jobs", "1"]) == 0
    out = capsys.readouterr().out
    assert "Fault coverage:" in out and "Masked parts" in out and "depth quick" in out
    assert sorted(p.name for p in (tmp_path / "demo").iterdir()) == ["readings.csv", "report.html", "survey.json"]
