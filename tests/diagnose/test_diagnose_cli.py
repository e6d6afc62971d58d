"""The diagnose command as a user meets it: text, JSON, bad input."""

import json

import pytest

from incircuit.cli import main
from incircuit.safety import CAUTIONS

# Dried reservoir capacitor: 0.4 * 10 uF + 100 nF = 4.1 uF (parallel C add,
# Horowitz & Hill 3rd ed. 1.4.1).
NETLIST = """Dried reservoir capacitor beside a ceramic and a bleeder (test scenario)
C1 V 0 10u ; tol=20%
C2 V 0 100n ; tol=10%
R1 V 0 100k ; tol=5%
.end
"""


@pytest.fixture
def board(tmp_path):
    path = tmp_path / "dried.cir"
    path.write_text(NETLIST, encoding="utf-8")
    return str(path)


def test_text_output_has_decision_next_step_and_cautions(board, capsys):
    assert main(["diagnose", board, "C1", "--reading", "4.1uF", "--samples", "40"]) == 0
    out = capsys.readouterr().out
    assert "Decision: REMOVE-AND-TEST" in out
    assert "C1 at 40 % of nominal" in out
    assert "Next step:" in out
    assert "of 40 samples" in out and "tails are rough" in out
    for caution in CAUTIONS:
        assert caution in out


def test_json_output_keys(board, capsys):
    assert main(["diagnose", board, "c1", "--reading", "4u1", "--samples", "40", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["decision"] == "remove-and-test"
    assert data["part"] == "C1" and data["probes"] == ["V", "0"]
    assert data["reading"]["text"] == "4u1" and data["reading"]["kind"] == "capacitor"
    best = data["hypotheses"][0]
    assert {"part", "fault", "value", "score", "predicted"} <= set(best)
    assert (best["part"], best["fault"]) == ("C1", "drift")
    assert best["value"] == pytest.approx(4.0e-6, rel=0.05)  # 40 % of 10 uF, see test_diagnose_cases
    scores = [h["score"] for h in data["hypotheses"]]
    assert scores == sorted(scores, reverse=True)
    assert sum(scores) == pytest.approx(1.0, abs=1e-9)  # normalised posterior
    assert data["band"]["kind"] == "capacitor" and data["band"]["samples"] == 40
    assert data["next_step"]["text"]
    assert data["cautions"] == list(CAUTIONS)


def test_readings_file_is_combined(board, tmp_path, capsys):
    csv = tmp_path / "r.csv"
    csv.write_text("part,probes,reading\nC1,,4.1uF\nC1,V;0,4.0uF\n", encoding="utf-8")
    assert main(["diagnose", board, "C1", "--readings", str(csv), "--samples", "40", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert len(data["readings"]) == 2 and data["decision"] == "remove-and-test"


@pytest.mark.parametrize(
    "extra,message",
    [
        (["--reading", "4.1xF"], "cannot read '4.1xF'"),
        (["--reading", "4.7"], "bare number"),
        ([], "give --reading"),
        (["--reading", "4u", "--probes", "V,NOPE"], "no net 'NOPE'"),
        (["--reading", "4u", "--samples", "3"], "--samples"),
    ],
)
def test_bad_input_is_one_line_and_exit_2(board, capsys, extra, message):
    assert main(["diagnose", board, "C1", *extra]) == 2
    err = capsys.readouterr().err
    assert message in err and err.count("\n") == 1


def test_bad_csv_row_names_file_and_line(board, tmp_path, capsys):
    csv = tmp_path / "r.csv"
    csv.write_text("part,probes,reading\nC1,,4.1uF\nC1,,lots\n", encoding="utf-8")
    assert main(["diagnose", board, "C1", "--readings", str(csv)]) == 2
    err = capsys.readouterr().err
    assert f"{csv}:3:" in err and err.count("\n") == 1


def test_unknown_part(board, capsys):
    assert main(["diagnose", board, "C9", "--reading", "4u"]) == 2
    assert "no part 'C9'" in capsys.readouterr().err
