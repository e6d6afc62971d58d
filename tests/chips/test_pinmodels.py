"""The unpowered-pin model of each role, as circuit elements.

Topology only; the electrical behaviour (two junction drops in series with a
rail's capacitance) is checked against the Shockley equation in
test_probe_chip.py.
"""

from __future__ import annotations

import subprocess
import sys

from incircuit.chips import apply_pin_roles
from incircuit.chips.pinmodels import PIN_DIODE, PIN_MODEL_VALUES, SHORT_OHMS
from incircuit.circuit import elements
from incircuit.model import Board, Part


def _els(*parts, files=(), switches=None):
    board = apply_pin_roles(Board("b", parts), files, switches)
    return {e.name: e for e in elements(board).elements}


def _chip(roles, nets, model="CHIP"):
    return Part("U1", "X", nets, model=model, params={"roles": roles, "roles_origin": "file x"})


def _board(chip, *loaded):
    """The chip plus a resistor on each net in ``loaded`` (so those pins are not free)."""
    return Board("b", (chip, *(Part(f"R{i}", "R", (n, "ELSEWHERE"), 1e3) for i, n in enumerate(loaded))))


def _chip_elements(board):
    return [e for e in elements(board).elements if e.part == "U1"]


def test_input_pin_has_diodes_to_each_rail_and_its_capacitance_and_leakage():
    u = _chip(("input", "supply", "supply", "ground"), ("IN", "VA", "VB", "GND"))
    els = {e.name: e for e in _chip_elements(_board(u, "IN"))}
    diodes = {(e.nodes, e.model.name) for e in els.values() if e.kind == "D"}
    assert {(("IN", "VA"), "~PINDIODE"), (("IN", "VB"), "~PINDIODE"), (("GND", "IN"), "~PINDIODE")} <= diodes
    # supply clamps: ground anode -> each supply
    assert {(("GND", "VA"), "~PINDIODE"), (("GND", "VB"), "~PINDIODE")} <= diodes
    assert len(diodes) == 5
    caps = sorted((e.nodes, e.value) for e in els.values() if e.kind == "C")
    assert (("IN", "GND"), PIN_MODEL_VALUES["pin_capacitance"][0]) in caps
    assert (("VA", "GND"), PIN_MODEL_VALUES["supply_capacitance"][0]) in caps
    assert all(e.part == "U1" for e in els.values())


def test_open_drain_has_only_ground_side_junctions():
    u = _chip(("open-drain", "supply", "ground"), ("OD", "VCC", "GND"))
    els = _chip_elements(_board(u, "OD"))
    on_pin = [e for e in els if e.kind == "D" and "OD" in e.nodes]
    assert len(on_pin) == 2 and all(e.nodes == ("GND", "OD") for e in on_pin)


def test_rails_no_connect_and_pins_on_a_rail_add_no_signal_parts():
    u = _chip(("no-connect", "supply", "ground", "input", "open"), ("NC", "VCC", "GND", "VCC", "X"))
    els = _chip_elements(_board(u, "NC", "X"))
    assert not any("NC" in e.nodes or "X" in e.nodes for e in els)
    assert sorted(e.kind for e in els) == ["C", "D", "R"]  # the supply clamp, capacitance, leakage


def test_two_signal_pins_on_one_net_share_one_set_of_diodes():
    u = _chip(("input", "input", "supply", "ground"), ("IN", "IN", "VCC", "GND"))
    els = _chip_elements(_board(u, "IN"))
    assert sum(1 for e in els if e.kind == "D" and "IN" in e.nodes) == 2


def test_a_free_pin_adds_nothing():
    u = _chip(("input", "input", "supply", "ground"), ("IN", "FREE", "VCC", "GND"))
    els = _chip_elements(_board(u, "IN"))
    assert not any("FREE" in e.nodes for e in els)


def test_rails_tied_by_a_short_part_get_one_diode():
    u = _chip(("input", "supply", "supply", "ground"), ("IN", "VCC", "AVCC", "GND"))
    bead = Part("FB1", "X", ("VCC", "AVCC"), model="BEAD-1", params={"roles": ("short", "short")})
    els = _chip_elements(Board("b", (u, bead, Part("R1", "R", ("IN", "X"), 1e3))))
    assert sorted(e.nodes for e in els if e.kind == "D") == [("GND", "IN"), ("GND", "VCC"), ("IN", "VCC")]


def test_diode_model_is_the_documented_generic_junction():
    assert PIN_DIODE.type == "D"
    assert PIN_DIODE.params["is"] == PIN_MODEL_VALUES["diode_is"][0]
    assert PIN_DIODE.params["n"] == PIN_MODEL_VALUES["diode_n"][0]
    assert set(PIN_DIODE.params) == {"is", "n", "cjo"}
    for name, (value, unit, source) in PIN_MODEL_VALUES.items():
        assert value > 0 and unit and source.split(":")[0] in ("from memory", "common practice"), name


def test_short_switch_and_open_parts(tmp_path):
    fuse = Part("F1", "X", ("A", "B"), model="FUSE-X")
    bead = Part("FB1", "X", ("B", "C"), model="BEAD-X")
    sw = Part("SW1", "X", ("C", "D"), model="SWITCH-X")
    xtal = Part("Y1", "X", ("D", "E"), model="CRYSTAL-X")
    p = tmp_path / "r.toml"
    p.write_text('[part.FB1]\nrole = "short"\nohms = 0.3\n')
    els = _els(fuse, bead, sw, xtal, files=[str(p)])
    assert els["F1~R"].value == SHORT_OHMS and els["F1~R"].nodes == ("A", "B")
    assert els["FB1~R"].value == 0.3
    assert not any(e.part in ("SW1", "Y1") for e in els.values())
    closed = _els(fuse, bead, sw, xtal, switches={"SW1": "closed"})
    assert closed["SW1~R"].value == SHORT_OHMS


def test_part_without_roles_stays_open():
    u = Part("U1", "X", ("A", "B"), model="NOTHING")
    assert elements(Board("b", (u,))).elements == ()


def test_importing_circuit_does_not_import_the_chip_package():
    code = "import incircuit.circuit, sys; print('incircuit.chips' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
