"""Discharge of a part that rings against the probes' stray capacitance."""

from incircuit.netlist import parse_text
from incircuit.predict import identify


def test_small_inductor_discharges_and_reads_as_a_short():
    # A 1 uH coil with the probes' tens of pF rings at tens of MHz after the
    # inductance step (f = 1/(2 pi sqrt(LC)), Horowitz & Hill 3rd ed. ch. 1),
    # swinging the highest probe from one side to the other; the discharge
    # must follow every swing instead of giving up. At the tester's
    # millisecond steps the coil is a short (its DC resistance, zero here).
    board = parse_text("ringing coil\nL1 A B 1u\n.end\n")
    run = identify(board, ("A", "B"))
    assert run.reading.kind == "resistor"
    assert run.reading.value is not None and abs(run.reading.value) < 1.0  # 1 ohm: a few ADC counts
