"""The pin-role options through the CLI (incircuit.cli.main, in process)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from incircuit.cli import main

ROOT = Path(__file__).resolve().parents[2]
BOARD = str(ROOT / "netlists" / "exported-controller.cir")
PINS = str(ROOT / "netlists" / "exported-controller.pins.toml")


@pytest.mark.parametrize("text, line, words", [
    ('[subckt."KM8-TQ32"]\ndefault = "bidirectional"\n[subckt."KM8-TQ32".pins]\n4 = "power"\n', 4,
     "unknown pin role 'power'"),
    ('[part.XF1]\nrole = "short"\nohm = 1\n', 3, "unknown key 'ohm'"),
    ('[part.XF1\nrole = "short"\n', 1, "not valid TOML"),
    ('\n\n[subckt."DA202-SO8"]\npins = ["input", "output"]\n', 4, "gives 2 pins but XU3 has 8"),
])
def test_pin_role_file_errors_are_one_line_with_file_and_line(tmp_path, capsys, text, line, words):
    bad = tmp_path / "bad.toml"
    bad.write_text(text)
    assert main(["show", BOARD, "--pins", str(bad)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1
    assert err.startswith(f"incircuit: {bad}:{line}: ") and words in err


def test_missing_pin_role_file_and_bad_switch(tmp_path, capsys):
    assert main(["show", BOARD, "--pins", str(tmp_path / "none.toml")]) == 2
    assert "none.toml" in capsys.readouterr().err
    assert main(["show", BOARD, "--pins", PINS, "--switch", "XSW1=pressed"]) == 2
    assert "PART=open or PART=closed" in capsys.readouterr().err
    assert main(["show", BOARD, "--pins", PINS, "--switch", "XJ1=closed"]) == 2
    assert "its role is not switch" in capsys.readouterr().err


def test_show_lists_roles_pin_by_pin_with_their_origin(capsys):
    assert main(["show", BOARD, "--pins", PINS]) == 0
    out = capsys.readouterr().out
    assert f"XU3 (DA202-SO8): file {PINS}:" in out
    assert "    supply: 8 V+ (+12V)" in out
    assert "Uncertain nets" not in out
    assert main(["show", BOARD, "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    u3 = next(u for u in data["unmodelled"] if u["part"] == "XU3")
    assert u3["origin"] == "guess" and u3["entry"] is None
    assert u3["pins"][7] == {"pin": 8, "name": None, "net": "+12V", "role": "supply", "basis": "net +12V"}
    assert u3["pins"][0]["role"] == "unknown"
    assert "XU3 pin 1" in data["uncertain_nets"]["OUTA"]


def test_later_pins_file_overrides_earlier_on_the_command_line(tmp_path, capsys):
    extra = tmp_path / "fix.toml"
    extra.write_text('[part.XU3]\npins = ["output", "input", "input", "ground", '
                     '"no-connect", "no-connect", "no-connect", "supply"]\n')
    assert main(["show", BOARD, "--pins", PINS, "--pins", str(extra), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    u3 = next(u for u in data["unmodelled"] if u["part"] == "XU3")
    assert u3["origin"] == f"file {extra}" and u3["pins"][4]["role"] == "no-connect"


def test_predict_with_the_pin_role_file_is_certain_and_without_it_is_marked(capsys):
    # R13 feeds the MOSFET gate from microcontroller pin 9 (net GATE_DRV)
    assert main(["predict", BOARD, "R13", "--pins", PINS, "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["in_circuit"]["kind"] == "resistor" and data["uncertain"] == []
    assert main(["predict", BOARD, "R13"]) == 0
    out = capsys.readouterr().out
    assert "uncertain: net GATE_DRV touches XU1 pin 9 (KM8-TQ32): role unknown" in out
