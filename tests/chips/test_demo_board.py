"""The exported-style demo board: imports, takes its pin-role file, and without
it marks every net that touches a guessed or unknown pin."""

from __future__ import annotations

import argparse
from pathlib import Path

import pytest

from incircuit.chips import uncertain_nets, uncertainty_reasons, unmodelled_summary
from incircuit.circuit import elements
from incircuit.commands.common import add_board_arguments, load_board_from_args
from incircuit.errors import InputError

ROOT = Path(__file__).resolve().parents[2]
BOARD = str(ROOT / "netlists" / "exported-controller.cir")
PINS = str(ROOT / "netlists" / "exported-controller.pins.toml")


def _load(*argv):
    parser = argparse.ArgumentParser()
    add_board_arguments(parser)
    return load_board_from_args(parser.parse_args([BOARD, *argv]))


def test_with_its_pin_role_file_every_unmodelled_part_comes_from_the_file():
    board = _load("--pins", PINS)
    summary = unmodelled_summary(board)
    assert len(summary) == 13
    assert all(s["origin"] == f"file {PINS}" for s in summary)
    assert uncertain_nets(board) == {}
    assert 40 <= len(board.parts) <= 80


def test_pin_roles_become_junctions_on_the_microcontroller_rails():
    board = _load("--pins", PINS)
    els = [e for e in elements(board).elements if e.part == "XU1" and e.kind == "D"]
    # pin 12 (LED_A, bidirectional): up to +3V3 (+3V3A is tied to it by the bead FB1)
    # and up from ground
    on_led = sorted(e.nodes for e in els if "LED_A" in e.nodes)
    assert on_led == [("0", "LED_A"), ("LED_A", "+3V3")]
    # free pins (NC_* nets) add nothing
    assert not any(n.startswith("NC_") for e in els for n in e.nodes)


def test_without_it_the_chip_and_rail_nets_are_uncertain():
    board = _load()
    shaky = uncertain_nets(board)
    for net in ("+3V3", "0", "LED_A", "ADC0", "OUTA", "SENSE1", "XTAL1", "+12V_IN"):
        assert net in shaky, net
    # R2 sits between an MCU pin and an LED: its reading is marked
    assert uncertainty_reasons(board, ("LED_A", "NET_D2"))
    # R11, the op-amp's feedback resistor, too
    assert any("XU3" in r for r in uncertainty_reasons(board, ("OUTB", "INB_N")))


def test_switch_option_closes_the_reset_button():
    closed = _load("--pins", PINS, "--switch", "xsw1=closed")
    assert closed.part("XSW1").params["switch_state"] == "closed"
    assert any(e.part == "XSW1" for e in elements(closed).elements)
    with pytest.raises(InputError, match="PART=open or PART=closed"):
        _load("--switch", "XSW1")
