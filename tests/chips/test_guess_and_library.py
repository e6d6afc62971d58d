"""Roles guessed from names, and the bundled library of generic role sets.

Library pin-outs are the usual industry pin-outs of those package types
(common practice); the checks below test matching and structure, which
need no outside reference.
"""

from __future__ import annotations

import pytest

from incircuit.chips import apply_pin_roles, uncertain_nets
from incircuit.chips.guess import guess_roles, rail_role
from incircuit.chips.library import library_files
from incircuit.chips.roles import PIN_ROLES, PART_ROLES
from incircuit.model import Board, Part


@pytest.mark.parametrize("name", ["VCC", "VDD", "V+", "AVDD", "DVDD", "+5V", "+3V3", "+12V", "+3.3V",
                                  "3V3", "VDDIO", "vcc", "/power/+5V", "VCC_3V3"])
def test_supply_names(name):
    assert rail_role(name) == "supply"


@pytest.mark.parametrize("name", ["GND", "VSS", "AGND", "DGND", "PGND", "V-", "VEE", "0", "-12V", "gnd",
                                  "GND_ISO", "VSSA"])
def test_ground_names(name):
    assert rail_role(name) == "ground"


@pytest.mark.parametrize("name", ["PA3", "RESET", "VIN", "VOUT", "VREF", "N001", "10", "SDA", "", "OUT+"])
def test_nothing_else_is_guessed(name):
    assert rail_role(name) is None


def test_pin_name_is_tried_before_the_net_name():
    part = Part("U1", "X", ("N1", "+5V", "N3"), model="Q")
    roles, basis = guess_roles(part, ("VSS", "", ""))
    assert roles == ("ground", "supply", "unknown")
    assert basis == ("pin name VSS", "net +5V", "")


def test_guessed_and_unknown_pins_make_their_nets_uncertain():
    board = apply_pin_roles(Board("b", (
        Part("U1", "X", ("SIG", "+5V", "GND"), model="MYSTERY"),
        Part("J1", "X", ("P1", "P2"), model="PLUG-X"),
        Part("R1", "R", ("SIG", "OTHER"), 1e3),
    )))
    u1 = board.part("U1").params
    assert (u1["roles"], u1["roles_origin"]) == (("unknown", "supply", "ground"), "guess")
    assert board.part("J1").params["roles_origin"] == "unknown"
    shaky = uncertain_nets(board)
    assert set(shaky) == {"SIG", "+5V", "GND", "P1", "P2"}
    assert "U1 pin 2 (MYSTERY): supply guessed from net +5V" in shaky["+5V"]
    assert "role unknown, treated as open" in shaky["SIG"]


def test_library_files_use_only_known_roles_and_consistent_counts():
    files = library_files()
    assert len(files) >= 6
    for f in files:
        for e in f.entries:
            assert e.is_pattern, e.key
            assert set(e.pins.values()) <= set(PIN_ROLES)
            assert e.part_role in (None,) + PART_ROLES
            if e.pins and e.default is None:
                assert sorted(e.pins) == list(range(1, e.count + 1))


def _roles(model, nets):
    b = apply_pin_roles(Board("b", (Part("U1", "X", nets, model=model),)))
    return b.part("U1").params


@pytest.mark.parametrize("model, n, supply, ground", [
    ("OPAMP2-SO8", 8, [8], [4]),
    ("opamp_dual_generic", 8, [8], [4]),
    ("OPAMP1-DIP8", 8, [7], [4]),
    ("OPAMP4-SO14", 14, [4], [11]),
    ("QUAD-NAND2-SO14", 14, [14], [7]),
    ("QUAD-NOR2-DIP14", 14, [14], [7]),
    ("REG3-5V", 3, [1], [2]),
    ("TIMER8-DIP", 8, [8], [1]),
    ("COMPARATOR2-SO8", 8, [8], [4]),
    ("COMPARATOR4-SO14", 14, [3], [12]),
])
def test_library_matches_by_name_pattern_and_pin_count(model, n, supply, ground):
    p = _roles(model, tuple(f"N{i}" for i in range(1, n + 1)))
    assert p["roles_origin"].startswith("library ")
    roles = p["roles"]
    assert [i + 1 for i, r in enumerate(roles) if r == "supply"] == supply
    assert [i + 1 for i, r in enumerate(roles) if r == "ground"] == ground


def test_pattern_with_another_pin_count_does_not_match():
    p = _roles("OPAMP2-ODD", tuple(f"N{i}" for i in range(1, 6)))
    assert p["roles_origin"] == "unknown"


def test_open_drain_gate_variant_wins_over_plain_gate():
    p = _roles("QUAD-NAND2-OD-SO14", tuple(f"N{i}" for i in range(1, 15)))
    assert p["roles"][2] == "open-drain"


def test_microcontroller_pattern_takes_rails_from_net_names():
    p = _roles("MCU-TINY", ("PB0", "+3V3", "GND", "PB1", "VSS"))
    assert p["roles"] == ("bidirectional", "supply", "ground", "bidirectional", "ground")


@pytest.mark.parametrize("model, role", [("CONN-1X4", "open"), ("HEADER-2X5", "open"),
                                         ("CRYSTAL-8MHZ", "open"), ("XTAL-32K", "open"),
                                         ("FUSE-1A", "short"), ("FERRITE-0603", "short"),
                                         ("JUMPER-2", "short"), ("SWITCH-PUSH", "switch")])
def test_interconnect_parts(model, role):
    n = 4 if role == "open" and model.startswith(("CONN", "HEADER")) else 2
    p = _roles(model, tuple(f"N{i}" for i in range(1, n + 1)))
    assert p["roles"] == (role,) * n


def test_no_rail_guess_for_connectors_switches_crystals_and_fuses():
    # designator classes per IEEE 315 / ASME Y14.44: J connector, SW switch, Y crystal, F fuse
    parts = tuple(Part(n, "X", ("+3V3", "GND"), model="ODD") for n in ("XJ2", "XSW1", "Y1", "XF1"))
    board = apply_pin_roles(Board("b", parts + (Part("XU5", "X", ("+3V3", "GND"), model="ODD"),)))
    for name in ("XJ2", "XSW1", "Y1", "XF1"):
        assert board.part(name).params["roles"] == ("unknown", "unknown")
        assert board.part(name).params["roles_origin"] == "unknown"
    assert board.part("XU5").params["roles"] == ("supply", "ground")
