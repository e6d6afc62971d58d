"""The invented demo boards in netlists/: they import cleanly and their
models read like the parts they stand for.

References:
* forward voltage from the Shockley equation with series resistance,
  I = Is (exp(Vj / (n Vt)) - 1), V = Vj + I Rs: Sze, Physics of
  Semiconductor Devices; Vt = kT/q at ngspice's default 27 C;
* typical forward voltages at mA currents (silicon about 0.6-0.7 V,
  Schottky 0.2-0.4 V, red LED about 1.8-2 V): common practice;
* the ngspice user manual 2.1.4.5 (gnd is node 0).
"""

from __future__ import annotations

import math

import pytest
from scipy.optimize import brentq

from incircuit.chips import apply_pin_roles
from incircuit.demo_boards import (
    DEFAULT_DEMO,
    DEMO_BOARDS,
    demo_board_paths,
    demo_pin_files,
    resolve_board,
)
from incircuit.errors import InputError
from incircuit.netlist import load

#: The hand-written boards (full models, a tolerance on every passive line);
#: the exported-style board has its own tests under tests/chips/.
NAMES = [name for name in DEMO_BOARDS if name != "exported-controller"]

#: Boltzmann constant / elementary charge (CODATA 2018, exact SI values).
K_OVER_Q = 1.380649e-23 / 1.602176634e-19
VT_27C = K_OVER_Q * 300.15

#: Forward-voltage bands per model class at 2-7 mA (common practice), with
#: a margin of 0.05 V for the series resistance and the spread of real parts.
BANDS = {
    "silicon": (0.55, 0.85),
    "schottky": (0.15, 0.40),
    "red": (1.80, 2.00),
    "green": (1.90, 2.10),
}


def model_class(name: str) -> str:
    if name.startswith("DSCH"):
        return "schottky"
    if name.startswith("DLEDRED"):
        return "red"
    if name.startswith("DLEDGRN"):
        return "green"
    return "silicon"  # rectifier, small-signal, body, ESD and zener (forward)


def forward_voltage(params, amps: float) -> float:
    """Sze: Shockley junction plus ohmic series resistance, solved for V."""
    i_s, n, rs = params["is"], params.get("n", 1.0), params.get("rs", 0.0)
    vj = brentq(lambda v: i_s * math.expm1(v / (n * VT_27C)) - amps, 0.0, 5.0, xtol=1e-9)
    return vj + amps * rs


@pytest.fixture(scope="module", params=NAMES)
def demo(request):
    path = demo_board_paths()[request.param]
    return request.param, path, load(str(path))


def test_every_demo_board_is_listed_and_present():
    paths = demo_board_paths()
    assert DEFAULT_DEMO == "power-stage" and DEFAULT_DEMO in paths
    for name, path in paths.items():
        assert path.is_file(), name
        assert path.parent.name == "netlists"


def test_imports_with_30_to_120_parts(demo):
    name, path, board = demo
    assert 30 <= len(board.parts) <= 120, (name, len(board.parts))
    lines = path.read_text().splitlines()
    assert board.name == lines[0].strip()  # the title line comes first
    assert lines[1].startswith("* Invented scenario")
    assert lines[-1].strip().lower() == ".end"
    assert not [n for n in board.notes if "error" in n.lower()]


def test_every_semiconductor_has_a_model_card_of_its_type(demo):
    name, _, board = demo
    wanted = {"D": {"D"}, "Q": {"NPN", "PNP"}, "M": {"NMOS", "PMOS"}}
    for part in board.parts:
        if part.kind in wanted:
            model = board.models.get(part.model or "")
            assert model is not None and model.type in wanted[part.kind], (name, part.name)


def test_tolerances_written_on_every_passive_line_and_esr_on_electrolytics(demo):
    name, _, board = demo
    for part in board.parts:
        if part.kind not in ("R", "C", "L") or "." in part.name:  # subcircuit internals use defaults
            continue
        assert part.tolerance is not None and part.tolerance.origin == "netlist", (name, part.name)
        if part.kind == "C" and part.value >= 10e-6:  # the electrolytics of these boards
            assert part.params.get("esr"), (name, part.name)


def test_demo_pin_files_leave_no_guessed_roles(demo):
    name, path, board = demo
    files = [str(p) for p in demo_pin_files(name)]
    with_roles = apply_pin_roles(board, files)
    for part in with_roles.parts:
        if part.kind == "X":
            origin = str(part.params["roles_origin"])
            assert origin.startswith(("file", "library")), (name, part.name, origin)


@pytest.mark.parametrize("name", NAMES)
def test_diode_models_read_like_their_parts_sze(name):
    board = load(str(demo_board_paths()[name]))
    diodes = {n: m for n, m in board.models.items() if m.type == "D"}
    assert diodes
    for model_name, model in diodes.items():
        low, high = BANDS[model_class(model_name)]
        for amps in (2e-3, 6.5e-3):  # a few mA, as a tester's low drive gives
            v = forward_voltage(model.params, amps)
            assert low <= v <= high, (name, model_name, amps, v)


def test_zener_breakdown_matches_its_name():
    for name in NAMES:
        board = load(str(demo_board_paths()[name]))
        for model_name, model in board.models.items():
            if model_name.startswith("DZ"):
                rated = float(model_name[2:].replace("V", "."))
                assert model.params["bv"] == pytest.approx(rated, rel=1e-12), model_name  # exact text


def test_resolve_board_accepts_a_file_or_a_demo_name(tmp_path):
    path, pins = resolve_board("relay-driver")
    assert path.endswith("relay-driver.cir") and pins and pins[0].endswith("relay-driver.pins.toml")
    own = tmp_path / "b.cir"
    own.write_text("t\nR1 a b 1k\n.end\n")
    assert resolve_board(str(own)) == (str(own), ())
    with pytest.raises(InputError, match="no such netlist file or demo board"):
        resolve_board(str(tmp_path / "missing.cir"))
    with pytest.raises(InputError, match="not a netlist file"):
        resolve_board(str(tmp_path))
