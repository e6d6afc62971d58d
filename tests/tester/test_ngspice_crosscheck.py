"""The identification on ngspice (an independent simulator) reads what the analytic engine reads.

Kept to three parts: each run drives ngspice through a few dozen transients.
Tolerance: the profile's stated accuracy of the reading (both engines
simulate the same circuit; ngspice's reltol=1e-4 moves an ADC reading by at
most about one count).
"""

from __future__ import annotations

import pytest

from incircuit.engines.ngspice import available
from incircuit.model import Board, Model, Part
from incircuit.predict import identify
from incircuit.tester.profile import load_profile

REASON = available()
pytestmark = pytest.mark.skipif(REASON is not None, reason=f"ngspice not available: {REASON}")

PROFILE = load_profile()
MODELS = {"DSI": Model("DSI", "D", {"is": 2.52e-9, "n": 1.752, "rs": 0.568})}


@pytest.mark.parametrize("part", [
    Part("R1", "R", ("A", "B"), 10e3),
    Part("C1", "C", ("A", "B"), 100e-6, params={"esr": 0.5}),
    Part("D1", "D", ("B", "A"), model="DSI"),
])
def test_ngspice_and_analytic_agree(part):
    board = Board("x", (part,), MODELS)
    fast = identify(board, ("A", "B"), PROFILE, "analytic", trace_points=0).reading
    spice = identify(board, ("A", "B"), PROFILE, "ngspice", trace_points=0).reading
    assert spice.kind == fast.kind
    assert abs(spice.value - fast.value) <= PROFILE.accuracy(fast)
    if part.kind == "D":
        assert spice.extra["anode"] == fast.extra["anode"] == 2
