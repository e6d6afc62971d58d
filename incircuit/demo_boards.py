"""The invented demo boards in ``netlists/``, shared by the demo, docs and tests.

The package is installed editable, so the boards are read from the
``netlists/`` folder beside the package. A command that takes a board
accepts a file path or one of these names; a name also brings the board's
pin-role file ``netlists/<name>.pins.toml`` (roles of its unmodelled chips)
when there is one.

>>> sorted(demo_board_paths())
['exported-controller', 'power-stage', 'relay-driver', 'sensor-frontend']
>>> DEFAULT_DEMO in demo_board_paths()
True
"""

from __future__ import annotations

import os
from pathlib import Path

from .errors import InputError

__all__ = [
    "DEMO_BOARDS",
    "DEFAULT_DEMO",
    "demo_dir",
    "demo_board_paths",
    "demo_pin_files",
    "resolve_board",
    "resolve_board_path",
]

#: Demo board name -> what it shows (the file is ``netlists/<name>.cir``).
DEMO_BOARDS = {
    "power-stage": "fused diode bridge, reservoir capacitors and bleeder, regulator, zener rail, LED",
    "sensor-frontend": "unpowered op-amps with protection diodes, clamps, RC filters, reference divider",
    "relay-driver": "NPN relay switch with flyback diode, MOSFET fan switch with body diode and shunt",
    "exported-controller": "as a schematic export leaves it: undefined chips and connectors, with a pin-role file",
}

#: The board that ``incircuit demo`` surveys.
DEFAULT_DEMO = "power-stage"


def demo_dir() -> Path:
    """The ``netlists/`` folder next to the package."""
    return Path(__file__).resolve().parent.parent / "netlists"


def demo_board_paths() -> dict[str, Path]:
    """Demo board name -> netlist path, in :data:`DEMO_BOARDS` order."""
    folder = demo_dir()
    return {name: folder / f"{name}.cir" for name in DEMO_BOARDS}


def demo_pin_files(name: str) -> tuple[Path, ...]:
    """The pin-role files of demo board ``name`` (none when it needs none)."""
    path = demo_dir() / f"{name}.pins.toml"
    return (path,) if name in DEMO_BOARDS and path.is_file() else ()


def resolve_board(board: str) -> tuple[str, tuple[str, ...]]:
    """Netlist path and pin-role files for a BOARD argument: ``board`` itself
    (no pin files) when it is a file, else the demo board of that name;
    InputError when it is neither."""
    if os.path.isfile(board):
        return board, ()
    demos = demo_board_paths()
    name = board.lower()
    path = demos.get(name)
    if path is not None and path.is_file():
        return str(path), tuple(str(p) for p in demo_pin_files(name))
    if os.path.exists(board):
        raise InputError("not a netlist file", board)
    raise InputError(f"no such netlist file or demo board (demo boards: {', '.join(demos)})", board)


def resolve_board_path(board: str) -> str:
    """The netlist path of a BOARD argument (see :func:`resolve_board`)."""
    return resolve_board(board)[0]
