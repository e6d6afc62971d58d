"""The prediction API and the ``incircuit predict`` command.

Reference values: two equal resistors in parallel read half of one
(Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 1).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from incircuit.cli import main
from incircuit.errors import EngineError, InputError
from incircuit.model import Board, Model, Part
from incircuit.predict import Prediction, Run, StepRecord, default_probes, identify, predict, predict_between
from incircuit.tester.profile import load_profile

NETLIST = """* predict test board
R1 A B 10k
R2 A B 10k
C1 B 0 100n
Q1 A B 0 QN
.model QN NPN(bf=100)
.end
"""


@pytest.fixture()
def board_file(tmp_path):
    path = tmp_path / "board.cir"
    path.write_text(NETLIST, encoding="utf-8")
    return str(path)


def _pair() -> Board:
    return Board("pair", (Part("R1", "R", ("A", "B"), 10e3), Part("R2", "R", ("A", "B"), 10e3)))


def test_predict_gives_isolated_and_in_circuit_runs():
    pred = predict(_pair(), "r1")
    assert pred.part == "R1" and pred.probes == ("A", "B") and pred.engine == "analytic"
    assert isinstance(pred.isolated, Run) and isinstance(pred.in_circuit, Run)
    profile = load_profile()
    # Horowitz & Hill ch.1: two equal resistors in parallel read half of one
    iso, inc = pred.isolated.reading, pred.in_circuit.reading
    assert abs(iso.value - 10e3) <= profile.accuracy(iso)
    assert abs(inc.value - 5e3) <= profile.accuracy(inc)
    assert pred.difference() == pytest.approx(inc.value / iso.value - 1.0, rel=1e-12)
    assert not pred.kind_changes()


def test_to_dict_has_exactly_the_documented_keys():
    data = predict(_pair(), "R1").to_dict()
    assert list(data) == ["part", "probes", "engine", "isolated", "in_circuit"]
    for key in ("isolated", "in_circuit"):
        assert list(data[key]) == ["kind", "value", "unit", "extra"]
    assert data["probes"] == ["A", "B"] and data["in_circuit"]["unit"] == "ohm"
    json.dumps(data, allow_nan=False)


def test_predict_between_has_no_isolated_run():
    pred = predict_between(_pair(), "b", "a")
    assert pred.part is None and pred.isolated is None and pred.probes == ("B", "A")
    assert pred.difference() is None and not pred.kind_changes()
    assert pred.to_dict()["isolated"] is None


def test_probes_off_the_part_leave_no_isolated_run():
    board = _pair().with_part(Part("R3", "R", ("B", "C"), 1e3))
    pred = predict(board, "R1", probes=("A", "C"))
    assert pred.isolated is None
    assert pred.in_circuit.reading.kind == "resistor"


def test_default_probes_follow_pin_order():
    board = Board("d", (Part("D1", "D", ("K", "J"), model="DX"), Part("K1", "K", (), 0.9,
                        params={"inductors": ("L1", "L2")})), {"DX": Model("DX", "D", {})})
    assert default_probes(board, "D1") == ("K", "J")
    with pytest.raises(InputError):
        default_probes(board, "K1")


def test_bad_names_are_input_errors():
    with pytest.raises(InputError, match="no part 'R9'"):
        predict(_pair(), "R9")
    with pytest.raises(InputError, match="no net 'Z'"):
        predict_between(_pair(), "A", "Z")
    with pytest.raises(InputError, match="unknown engine"):
        identify(_pair(), ("A", "B"), engine="abacus")


def test_four_probes_are_not_modelled():
    board = _pair().with_part(Part("R3", "R", ("B", "C"), 1e3)).with_part(Part("R4", "R", ("C", "D"), 1e3))
    with pytest.raises(EngineError) as info:
        identify(board, ("A", "B", "C", "D"))
    assert "three" in info.value.hint


def test_a_transistor_gets_three_probes(board_file):
    # Q1 (C B E) on nets A B 0; alone it reads hFE = BF (Ebers-Moll, Sze ch. 5)
    from incircuit.netlist import load
    board = load(board_file)
    assert default_probes(board, "Q1") == ("A", "B", "0")
    pred = predict(board, "Q1", trace_points=0)
    iso = pred.isolated.reading
    assert iso.kind == "bjt-npn" and iso.extra["pins"] == {"B": 2, "C": 1, "E": 3}
    # 1 % ADC quantisation of the collector and base currents (10-bit, common practice)
    assert iso.value == pytest.approx(100.0, rel=0.01)


def test_steps_and_trace_share_one_time_axis():
    run = predict(_pair(), "R1").in_circuit
    assert all(isinstance(s, StepRecord) for s in run.steps)
    starts = [s.t_start for s in run.steps]
    assert starts == sorted(starts) and starts[0] == 0.0
    for a, b in zip(run.steps, run.steps[1:]):
        assert b.t_start == pytest.approx(a.t_end, rel=1e-12, abs=1e-15)
    t, v = run.trace()
    assert v.shape == (len(t), 2) and np.all(np.isfinite(v))
    assert np.all(np.diff(t) >= 0) and t[-1] == pytest.approx(run.duration, rel=1e-12)
    assert set(run.steps[-1].result.nets) >= {"A", "B"}


def test_trace_points_zero_keeps_only_the_tester_samples():
    run = identify(_pair(), ("A", "B"), trace_points=0)
    t, v = run.trace()
    # the end of every step plus the half-way samples the conduction pulses read themselves
    assert len(t) == len(run.steps) + sum(len(s.sample_times) for s in run.steps)
    assert sum(len(s.sample_times) for s in run.steps) == 4 and v.shape == (len(t), 2)


# -- the command ------------------------------------------------------------------

def test_cli_text(board_file, capsys):
    assert main(["predict", board_file, "R1"]) == 0
    out = capsys.readouterr().out
    assert "alone:" in out and "in circuit:" in out and "difference:" in out
    assert "kind changes" in out  # the transistor's base-collector junction sits across R1
    assert "Predictions are aids, not guarantees." in out


def test_cli_json(board_file, capsys):
    assert main(["predict", board_file, "R1", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    # the stable contract comes first; the judgement's keys follow it
    assert list(data)[:6] == ["part", "probes", "engine", "isolated", "in_circuit", "uncertain"]
    assert {"verdict", "sensitivity", "reasons", "faults", "lift", "advice"} <= set(data)
    assert data["verdict"] in ("reliable", "predictable", "masked")
    assert data["uncertain"] == []  # no unmodelled parts on this board
    assert data["isolated"]["kind"] == "resistor"
    assert main(["predict", board_file, "--between", "A", "B", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["part"] is None and data["isolated"] is None and data["probes"] == ["A", "B"]


def test_cli_probes_option(board_file, capsys):
    assert main(["predict", board_file, "R1", "--probes", "B,A", "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["probes"] == ["B", "A"]


@pytest.mark.parametrize("argv,words", [
    (["R9"], "no part 'R9'"),
    (["--between", "A", "ZZ"], "no net 'ZZ'"),
    (["R1", "--probes", "A"], "write two or three nets"),
    (["R1", "--between", "A", "B"], "one of them"),
])
def test_cli_bad_input_exits_2_with_one_line(board_file, capsys, argv, words):
    assert main(["predict", board_file, *argv]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and words in err


def test_cli_bad_profile_names_file_and_line(board_file, tmp_path, capsys):
    bad = tmp_path / "tester.toml"
    bad.write_text("[instrument]\nname = 'x'\nname_source = 'y'\ncolour = 1\n", encoding="utf-8")
    assert main(["predict", board_file, "R1", "--tester", str(bad)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and f"{bad}:4:" in err


def test_cli_engine_error_exits_1_with_hint(board_file, capsys, monkeypatch):
    def failing(*args, **kwargs):
        raise EngineError("junction states did not settle", "try the ngspice engine")
    monkeypatch.setattr("incircuit.commands.predict.predict", failing)
    assert main(["predict", board_file, "Q1"]) == 1
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and err.startswith("incircuit: Q1:") and "ngspice" in err
