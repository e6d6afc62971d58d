"""The ngspice engine never hands user text to ngspice, and fails cleanly.

The deck grammar checked here is the subset of the ngspice user manual's
element, ``.model``, ``.ic``, ``.options`` and ``.tran`` syntax that the deck
writer uses (ngspice manual, chapters 2-11 and 15).
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
import textwrap

import pytest

from incircuit.engines import spice_deck
from incircuit.engines.base import Source
from incircuit.engines.ngspice import available
from incircuit.errors import EngineError
from incircuit.model import Board, Model, Part
from incircuit.netlist import parse_text

REASON = available()
needs_ngspice = pytest.mark.skipif(REASON is not None, reason=f"ngspice not available: {REASON}")

HOSTILE = [
    "R1;SHELL",
    "X.Y",
    "NET WITH SPACES",
    "Q'UOTE\"D",
    "{BRACE}",
    ".CONTROL",
    "SHELL TOUCH /TMP/X",
    "0",
    "GND\nSHELL RM -RF",
    "$(ECHO)",
    "A=B",
]

#: One token of a deck line: a generated name, a number, or a keyword=value.
TOKEN = re.compile(
    r"^(?:[a-z]+\d+|0|bk|dc|uic|[a-z]+=[-+0-9.e,]+|[-+]?\d[-+0-9.e]*\)?|pwl\(0|\)|"
    r"v\(n\d+\)=[-+0-9.e]+|mdl\d+|(?:d|npn|pnp|nmos|pmos|njf|pjf|vdmos)\((?:[a-z0-9_]+=[-+0-9.e]+)?\)?|"
    r"[a-z0-9_]+=[-+0-9.e]+\)|pchan|nchan)$"
)


def hostile_board() -> Board:
    nets = HOSTILE
    parts = [
        Part(f"R{i};SHELL {nets[i]}", "R", (nets[i], nets[(i + 1) % len(nets)]), 1e3 * (i + 1))
        for i in range(len(nets))
    ]
    parts.append(Part("C'1 .ENDC", "C", (nets[0], nets[3]), 1e-9, params={"esr": 0.1}))
    parts.append(Part("D{1}", "D", (nets[2], nets[5]), model="M;SHELL"))
    models = {"M;SHELL": Model("M;SHELL", "D", {"is": 1e-14, "n": 1.8})}
    return Board("x\n.control", tuple(parts), models)


def check_deck(text: str) -> None:
    lines = text.splitlines()
    assert lines[0] == "* incircuit step" and lines[-1] == ".end"
    for line in lines[1:-1]:
        words = line.split()
        head = words[0]
        assert re.match(r"^(?:\.model|\.ic|\.tran|\.options|[a-z]+\d*)$", head), line
        for word in words[1:]:
            assert TOKEN.match(word), f"unexpected token {word!r} in {line!r}"


def test_deck_holds_only_generated_names_and_numbers():
    board = hostile_board()
    deck = spice_deck.build(board, (HOSTILE[0], HOSTILE[7]), 30e-12)
    text = deck.text({}, {}, (Source(680.0, 5.0), None), 1e-3, 5e-6, (1e-4, 2e-4), "reltol=1e-5")
    check_deck(text)
    lowered = text.lower()
    for bad in ("shell", "control", "endc", "'", '"', "{", "$", ";", "touch"):
        assert bad not in lowered
    # every board net has a generated node and comes back by name
    assert set(deck.node_of) == set(board.nets) | {"C'1 .ENDC~ESR"}
    assert all(re.fullmatch(r"n\d+", node) for node in deck.node_of.values())


@pytest.mark.parametrize(
    "params",
    [{"is=1e-14)\n.control": 1.0}, {"n": "1.5 shell"}, {"n": float("nan")}, {"cjo": float("inf")}],
)
def test_hostile_model_parameters_are_refused(params):
    board = Board("m", (Part("D7", "D", ("A", "B"), model="DX"),), {"DX": Model("DX", "D", params)})
    with pytest.raises(EngineError) as info:
        spice_deck.build(board, ("A", "B"), 0.0)
    assert "D7" in str(info.value) and "DX" in info.value.hint


def test_model_of_the_wrong_kind_names_the_part():
    board = Board("m", (Part("D7", "D", ("A", "B"), model="QX"),), {"QX": Model("QX", "NPN", {"bf": 100.0})})
    with pytest.raises(EngineError, match="D7"):
        spice_deck.build(board, ("A", "B"), 0.0)


def test_part_without_value_names_the_part():
    with pytest.raises(EngineError) as info:
        spice_deck.build(Board("v", (Part("R9", "R", ("A", "B"), None),)), ("A", "B"), 0.0)
    assert "R9" in str(info.value) and "R9" in info.value.hint


@needs_ngspice
def test_hostile_names_simulate_and_come_back():
    board = hostile_board()
    session = __import__("incircuit.engines", fromlist=["get_engine"]).get_engine("ngspice").open(
        board, (HOSTILE[0], HOSTILE[7]), 30e-12
    )
    step = session.run((Source(680.0, 5.0), Source(680.0, 0.0)), 1e-3)
    assert set(step.nets) >= set(board.nets)
    assert all(abs(v) <= 5.0 + 1e-6 for v in step.nets.values())


CONTROL_NETLIST = """\
divider with a control block that would write files
R1 in out 10k
R2 out 0 10k
C1 out 0 100n
D1 out in DSIL
.model DSIL D(is=2.5n n=1.75)
.control
shell touch {marker}
set wr_singlescale
wrdata {marker}.dat v(out)
write {marker}.raw
.endc
.end
"""


@needs_ngspice
def test_control_block_in_netlist_never_runs(tmp_path):
    from incircuit.predict import predict

    marker = tmp_path / "written-by-ngspice"
    board = parse_text(CONTROL_NETLIST.format(marker=marker), path=str(tmp_path / "board.cir"))
    prediction = predict(board, "R1", engine="ngspice")
    assert prediction.in_circuit.reading.kind in ("resistor", "diode", "capacitor")
    assert list(tmp_path.iterdir()) == []


def _python(code: str, cwd: str, env: dict | None = None) -> subprocess.CompletedProcess:
    full_env = {**os.environ, **(env or {})}
    full_env["PYTHONPATH"] = os.pathsep.join([os.getcwd(), full_env.get("PYTHONPATH", "")])
    return subprocess.run([sys.executable, "-c", textwrap.dedent(code)], cwd=cwd, env=full_env,
                          capture_output=True, text=True, timeout=120)


RC_RUN = """
    from incircuit.engines import get_engine
    from incircuit.engines.base import Source
    from incircuit.model import Board, Part
    board = Board("rc", (Part("R1", "R", ("A", "B"), 1e3), Part("C1", "C", ("B", "G"), 1e-6)))
    session = get_engine("ngspice").open(board, ("A", "G"), 30e-12)
    print(session.run((Source(680.0, 5.0), Source(0.0, 0.0)), 1e-3).volts)
"""


@needs_ngspice
def test_startup_scripts_in_working_directory_are_not_run(tmp_path):
    # ngspice reads .spiceinit from the current directory at start-up (manual 16.6)
    marker = tmp_path / "marker"
    (tmp_path / ".spiceinit").write_text(f"shell touch {marker}\necho STARTUP-SCRIPT-RAN\n")
    done = _python(RC_RUN, str(tmp_path))
    assert done.returncode == 0, done.stderr
    assert not marker.exists()
    assert "STARTUP-SCRIPT-RAN" not in done.stdout + done.stderr
    # nothing from ngspice or PySpice reaches the user's terminal
    assert done.stderr == ""
    assert done.stdout.count("\n") == 1


def test_missing_library_is_an_engine_error(tmp_path):
    code = """
        from incircuit.engines import get_engine
        from incircuit.engines.ngspice import available
        from incircuit.errors import EngineError
        from incircuit.model import Board, Part
        print("reason:", available())
        try:
            get_engine("ngspice").open(Board("r", (Part("R1", "R", ("A", "B"), 1e3),)), ("A", "B"), 0.0)
        except EngineError as error:
            print("hint:", error.hint)
    """
    done = _python(code, str(tmp_path), {"NGSPICE_LIBRARY_PATH": str(tmp_path / "no-libngspice.so")})
    assert done.returncode == 0, done.stderr
    assert "reason: the ngspice shared library cannot be loaded" in done.stdout
    assert "--engine analytic" in done.stdout and "libngspice0-dev" in done.stdout


def test_importing_the_package_and_analytic_engine_never_loads_pyspice(tmp_path):
    code = """
        import sys
        import incircuit, incircuit.engines, incircuit.predict
        from incircuit.engines import get_engine, ngspice, spice_deck
        from incircuit.model import Board, Part
        from incircuit.predict import predict
        board = Board("r", (Part("R1", "R", ("A", "B"), 1e3),))
        predict(board, "R1", engine="analytic")
        print(sorted(m for m in sys.modules if m.lower().startswith("pyspice")))
    """
    done = _python(code, str(tmp_path))
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "[]"
