"""Every number the judge decides with, in one place (docs/verdicts.md).

Verdicts
    ``reliable``    the in-circuit reading is of the same kind as the
                    isolated one and inside the isolated reading's tolerance
                    band widened by the instrument's accuracy;
    ``masked``      the kind changes, or the sensitivity is below
                    :data:`MASKED_SENSITIVITY`;
    ``predictable`` otherwise: the reading differs from the part's own, but
                    a fault still moves it away from the predicted value.

Sensitivity ``S = (dReading/Reading) / (dValue/Value)`` is a symmetric
difference: the part's value times ``1 +/- step``, where the step is the
part's symmetric tolerance when it lies within :data:`TOLERANCE_STEP_RANGE`
(then the same two runs give the healthy band and S) and
:data:`PERTURBATION` otherwise. A junction has no
single value; its reading is a forward voltage, so its saturation current
is scaled by ``JUNCTION_IS_FACTOR`` both ways and the change of the
in-circuit reading is referred to the change of the isolated reading (the
"value" of a junction is what it reads alone). Transistors and FETs use
the same reading-referred form with the model parameter in
:data:`SEMICONDUCTOR_PARAMETER`.
"""

from __future__ import annotations

from types import MappingProxyType

__all__ = [
    "VERDICTS", "VERDICT_RANK", "MASKED_SENSITIVITY", "PERTURBATION", "JUNCTION_IS_FACTOR",
    "SEMICONDUCTOR_PARAMETER", "DEFAULT_TOLERANCE", "READING_TOLERANCE", "DETECT_MARGIN",
    "CONDUCTING_CURRENT", "CURRENT_SHARE_SHOWN", "MAX_NEIGHBOUR_PARTS", "MAX_GUARD_NETS",
    "METER_JUNCTION_SHARE", "BENCH_MIN_SENSITIVITY", "BENCH_MAX_RELATIVE_UNCERTAINTY", "ESR_COUNTS", "SELF_DISCHARGE_MARGIN", "TOLERANCE_STEP_RANGE",
]

#: Verdicts, best first.
VERDICTS = ("reliable", "predictable", "masked")
#: Rank of each verdict for sorting (lower is better).
VERDICT_RANK = MappingProxyType({v: i for i, v in enumerate(VERDICTS)})

#: Below this sensitivity a change of the part hardly moves the reading:
#: one fifth of a change shows, less than the spread of a typical healthy
#: band (common practice for "the part is masked").
MASKED_SENSITIVITY = 0.2

#: Relative step of the part's value for the symmetric difference. Ten per
#: cent stays well above the reading's quantisation and small enough that
#: the reading is close to linear in the value.
PERTURBATION = 0.10

#: A symmetric tolerance within these limits is used as the step instead:
#: at 5 % the change still spans about ten steps of the tester's divider
#: reading; up to 20 % a symmetric difference stays close to the derivative
#: (its error is second order in the step).
TOLERANCE_STEP_RANGE = (0.05, 0.20)

#: A junction's saturation current is multiplied and divided by this factor;
#: its forward voltage then moves by ``n Vt ln 4`` (about 36 mV for n = 1,
#: Sze's diode equation): a few per cent of the reading.
JUNCTION_IS_FACTOR = 4.0

#: Part kind -> (model parameter scaled for the sensitivity, its SPICE
#: default, the factor applied both ways): the parameter the tester's
#: reading of that kind follows. A transistor's gain (bf) and a FET's
#: threshold or pinch-off voltage (vto) move their readings in proportion,
#: so 10 % suffices; a junction's saturation current moves its forward
#: voltage only logarithmically, hence the larger factor. A parameter that
#: is zero cannot be scaled: no sensitivity is given then.
SEMICONDUCTOR_PARAMETER = MappingProxyType({
    "D": ("is", 1e-14, JUNCTION_IS_FACTOR),
    "Q": ("bf", 100.0, 1.0 + PERTURBATION),
    "M": ("vto", 0.0, 1.0 + PERTURBATION),
    "J": ("vto", -2.0, 1.0 + PERTURBATION),
})

#: Tolerance of a part whose netlist line gives none (common practice: 5 %
#: film resistors, 20 % electrolytic and ceramic capacitors and inductors).
DEFAULT_TOLERANCE = MappingProxyType({"R": 0.05, "C": 0.20, "L": 0.20})

#: How close an in-circuit reading must stay to the isolated one for parts
#: without a value tolerance: forward voltages (about +/-30 mV at 0.6 V,
#: from memory of diode data sheets' spread) and transistor gains or
#: thresholds (from memory: gains spread far more part to part; ten per cent
#: only asks that the circuit not change the reading noticeably).
READING_TOLERANCE = MappingProxyType({"D": 0.05, "Q": 0.10, "M": 0.10, "J": 0.10, "X": 0.10})

#: A fault is detectable when its reading leaves the healthy band by at least
#: this fraction of the band's edge value (beyond the instrument accuracy
#: already in the band): simulated readings carry timing and quantisation
#: steps of about a per cent.
DETECT_MARGIN = 0.01

#: A capacitor's healthy ESR range is widened by this many steps of the
#: tester's ESR resolution (its reading moves by about one step between runs).
ESR_COUNTS = 2.0

#: A capacitor's healthy self-discharge (the relative drop of its voltage
#: while the probes float) is widened by this much: a few ADC counts of a
#: 10-bit converter near full scale (common practice).
SELF_DISCHARGE_MARGIN = 0.02

#: A junction counts as conducting when its Shockley current reaches this
#: (A): a tenth of what the tester drives through its 470 kohm resistor
#: (about 10 uA, common practice). The same current defines a junction's
#: turn-on voltage when checking the LCR meter's test level.
CONDUCTING_CURRENT = 1e-6

#: A path beside the part is named with its share of the probe current when
#: it carries at least this fraction.
CURRENT_SHARE_SHOWN = 0.05

#: A multimeter's resistance reading is called junction-free while every
#: junction carries less than this share of the test current.
METER_JUNCTION_SHARE = 0.01

#: A bench reading inside the part's window must also follow the part this
#: closely (sensitivity) to be called reliable: a reading that is the part's
#: own moves one to one with it; below 0.8 the parts around it make up a
#: fifth or more of the reading and the match is a coincidence.
BENCH_MIN_SENSITIVITY = 0.8

#: A bench reading whose stated accuracy is wider than this fraction of the
#: part's value cannot judge the part, however well it matches: e.g. a
#: capacitance read with a loss factor far above 1 (a low resistance beside
#: the capacitor), where the meter's accuracy grows with the loss factor.
BENCH_MAX_RELATIVE_UNCERTAINTY = 0.25

#: The lift plan tries at most this many neighbour parts (nearest paths
#: first): each costs one identification run, and more than a few
#: neighbours rarely changes the best action.
MAX_NEIGHBOUR_PARTS = 4

#: A guarded bench measurement tries at most this many guard nets.
MAX_GUARD_NETS = 8
