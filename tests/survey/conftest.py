"""Small hand-analysed boards and shared surveys for the survey tests (invented boards).

Expected readings follow the parallel combination of resistors, Horowitz &
Hill, *The Art of Electronics*, 3rd ed., ch. 1 (H&H): two 10 kohm in
parallel read 5 kohm; 10 kohm beside 100 ohm reads 99 ohm and the
sensitivity of the reading to the 10 kohm part is Rp/(R+Rp) = 0.0099.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from incircuit.chips import apply_pin_roles
from incircuit.model import Board
from incircuit.netlist import parse_text
from incircuit.survey import Settings, survey
from incircuit.tester.profile import load_profile

PAIR = """Parallel pair
R1 A B 10k ; tol=1%
R2 A B 10k ; tol=1%
"""

MASKED = """Masked resistor and a bleeder across a capacitor
R1 A B 10k ; tol=1%
R2 A B 100 ; tol=1%
C1 C 0 100n ; tol=10%
RB C 0 100 ; tol=5%
R5 B C 47k ; tol=5%
"""

CHIP = """Chip input beside a resistor
R1 IN 0 10k ; tol=1%
XU1 IN VCC 0 BUF1
C1 VCC 0 10u ; tol=10%
"""

CHIP_PINS = """[subckt."BUF1"]
pins = ["input", "supply", "ground"]
"""


def board(text: str, path: str = "t.cir") -> Board:
    """A board from netlist text (no pin roles)."""
    return parse_text(text, path)


def chip_board(tmp_path: Path) -> Board:
    """:data:`CHIP` with the pin roles of its buffer."""
    pins = tmp_path / "chip.pins.toml"
    pins.write_text(CHIP_PINS)
    return apply_pin_roles(parse_text(CHIP, str(tmp_path / "chip.cir")), [str(pins)], {})


def write(tmp_path: Path, name: str, text: str) -> Path:
    path = tmp_path / name
    path.write_text(text)
    return path

#: The quick depth keeps these tests fast; the Monte Carlo band is tested apart.
QUICK = Settings(depth="quick")


@pytest.fixture(scope="session")
def profile():
    return load_profile()


@pytest.fixture(scope="session")
def pair_survey(profile):
    """The survey of :data:`PAIR` (shared: surveys cost seconds)."""
    return survey(board(PAIR), profile, QUICK)


@pytest.fixture(scope="session")
def masked_survey(profile):
    """The survey of :data:`MASKED`."""
    return survey(board(MASKED), profile, QUICK)


@pytest.fixture(scope="session")
def tb():
    """The boards and helpers of this file, for the test modules."""
    from types import SimpleNamespace
    return SimpleNamespace(PAIR=PAIR, MASKED=MASKED, CHIP=CHIP, CHIP_PINS=CHIP_PINS, board=board,
                           chip_board=chip_board, write=write, QUICK=QUICK)
