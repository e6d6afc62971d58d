"""``incircuit show`` on the demo boards: the paths read off each netlist by
hand are listed, the JSON parses, bad input is one line and exit code 2.

Expected values: paths traced by hand on the netlists in netlists/; series
resistances add (Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 1).
"""

from __future__ import annotations

import json

import pytest

from incircuit.cli import main

# Sums of a few resistor values: exact up to float round-off.
RTOL = 1e-9


def show_json(capsys, *argv: str) -> dict:
    assert main(["show", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def groups(pair: dict) -> dict[str, set[tuple[str, ...]]]:
    return {kind: {tuple(p["parts"]) for p in paths} for kind, paths in pair["paths"].items()}


def only_path(pair: dict, kind: str, parts: tuple[str, ...]) -> dict:
    (found,) = [p for p in pair["paths"][kind] if tuple(p["parts"]) == parts]
    return found


def test_power_stage_bleeder(capsys):
    d = show_json(capsys, "power-stage", "RBLD")
    assert d["part"]["nets"] == ["VRAW", "0"] and d["part"]["value"] == 4.7e3
    (pair,) = d["pairs"]
    g = groups(pair)
    # the only other resistors from VRAW to 0: the monitor divider R5 + R6
    assert g["resistive"] == {("R5", "R6")}
    assert only_path(pair, "resistive", ("R5", "R6"))["dc_resistance"] == pytest.approx(57e3, rel=RTOL)
    assert pair["equivalent_resistance"] == pytest.approx(57e3, rel=RTOL)
    # the reservoir, the regulator input capacitor and the snubbers of the bridge
    assert {("C6",), ("C7",), ("C8",), ("C10",), ("C2", "C4"), ("C3", "C5")} <= g["capacitive"]
    # each bridge leg: conducts from 0 up to VRAW (D3 then D1, D4 then D2)
    for leg in (("D1", "D3"), ("D2", "D4")):
        path = only_path(pair, "junction", leg)
        assert path["conducts"] == "reverse" and path["nets"][0] == "VRAW" and not path["blocks_dc"]
    assert "cut" in pair and pair["tied"] is False


def test_sensor_frontend_divider_leg(capsys):
    d = show_json(capsys, "sensor-frontend", "R5")
    (pair,) = d["pairs"]
    assert pair["nets"] == ["V10_DIV", "0"]
    g = groups(pair)
    # R4 up to the input, then the 1 Mohm input pull-down back to 0
    assert g["resistive"] == {("R4", "R9")}
    assert pair["equivalent_resistance"] == pytest.approx(100e3 + 1e6, rel=RTOL)
    # the filter capacitor and the op-amp's own input-pin capacitance
    assert g["capacitive"] == {("C3",), ("XU1.C3",)}
    # the clamp diode and the op-amp's protection diode from its V- pin
    for clamp in (("D24",), ("XU1.D8",)):
        assert only_path(pair, "junction", clamp)["conducts"] == "reverse"
    # the upper clamp charges the +5V rail's capacitors
    assert only_path(pair, "junction", ("D23", "C10"))["conducts"] == "forward"


def test_relay_driver_base_emitter_resistor(capsys):
    d = show_json(capsys, "relay-driver", "RBE")
    (pair,) = d["pairs"]
    assert pair["nets"] == ["Q1_B", "0"]  # GND is node 0 (ngspice manual 2.1.4.5)
    g = groups(pair)
    assert g["resistive"] == {("RB", "RPD")}
    assert pair["equivalent_resistance"] == pytest.approx(4.7e3 + 100e3, rel=RTOL)
    q1 = only_path(pair, "junction", ("Q1",))
    assert q1["links"][0]["via"] == ["B", "E"] and q1["conducts"] == "forward"
    assert ("RB", "XU2") in g["chip"]
    assert {"nets": ["0", "SENSE"], "parts": ["RSENSE"]} in d["tied"]


def test_relay_driver_mosfet_per_pin_pair(capsys):
    d = show_json(capsys, "relay-driver", "M1")
    assert d["part"]["pins"] == ["D", "G", "S", "B"]
    pairs = {tuple(p["pins"]): p for p in d["pairs"]}
    assert set(pairs) == {("D", "G"), ("D", "S"), ("G", "S")}  # bulk on the source
    gs = groups(pairs[("G", "S")])
    assert gs["resistive"] == {("RGS",)} and gs["junction"] == {("DZG",)}
    assert only_path(pairs[("G", "S")], "junction", ("DZG",))["conducts"] == "reverse"  # SENSE -> gate
    ds = pairs[("D", "S")]
    assert only_path(ds, "junction", ("DBODY",))["conducts"] == "reverse"  # source -> drain
    assert ds["equivalent_resistance"] is None  # no resistive path: drain to source


def test_summary_text_and_json(capsys):
    assert main(["show", "power-stage"]) == 0
    out = capsys.readouterr().out
    assert "Parts:  42 (10 resistors, 19 capacitors, 1 inductor, 11 diodes, 1 unmodelled part)" in out
    assert "AC1, AC1F  (by RF1 150 mohm)" in out
    d = show_json(capsys, "power-stage")
    assert d["parts"] == 42 and d["kinds"] == {"R": 10, "C": 19, "L": 1, "D": 11, "X": 1}
    assert d["unmodelled"][0]["part"] == "XU1" and d["unmodelled"][0]["roles"].startswith("file")
    assert {"nets": ["+12V", "+12V_OUT"], "parts": ["L1"]} in d["tied"]


def test_part_text_lists_groups_and_resistance(capsys):
    assert main(["show", "relay-driver", "rbe"]) == 0
    out = capsys.readouterr().out
    assert "RB (4.7 kohm) and RPD (100 kohm) in series: 105 kohm" in out
    assert "DC resistance of the rest of the board (resistors and inductors): 105 kohm" in out
    assert "Q1 (QNSW, B->E)   [Q1_B - 0; conducts Q1_B -> 0]" in out


def test_between_two_nets(capsys):
    d = show_json(capsys, "relay-driver", "--between", "Q1_B", "GND")
    (pair,) = d["pairs"]
    assert ("RBE",) in groups(pair)["resistive"]
    assert pair["equivalent_resistance"] == pytest.approx(1 / (1 / 47e3 + 1 / 104.7e3), rel=RTOL)


def one_error_line(capsys, argv: list[str]) -> str:
    assert main(argv) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    lines = captured.err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("incircuit: ") and "Traceback" not in captured.err
    return lines[0]


def test_unknown_part_is_one_line_exit_2(capsys):
    line = one_error_line(capsys, ["show", "relay-driver", "R99"])
    assert "relay-driver.cir" in line and "no part 'R99'" in line


def test_bad_board_and_net_are_one_line_exit_2(capsys, tmp_path):
    assert "no such netlist file" in one_error_line(capsys, ["show", str(tmp_path / "none.cir")])
    assert "no net 'NOPE'" in one_error_line(capsys, ["show", "power-stage", "--between", "VRAW", "NOPE"])
    bad = tmp_path / "bad.cir"
    bad.write_text("title\nR1 a b 1x2y\n.end\n")
    assert "bad.cir:2" in one_error_line(capsys, ["show", str(bad)])
