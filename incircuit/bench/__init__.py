"""Other bench instruments on the same board: a multimeter and an LCR meter.

Their profiles are TOML files (:mod:`.profile`); the physics is a nodal
analysis of the whole board (:mod:`.network`): a DC solve with Shockley
junctions for the multimeter, a small-signal AC analysis for the LCR meter
(:mod:`.measure`), shown as series and parallel equivalents
(:mod:`.impedance`).
"""

from .impedance import Equivalents
from .junctions import Channel, Junction, channels, junctions
from .measure import LCR_QUANTITIES, BenchReading, diode_drop, impedance, lcr_reading, ohms
from .network import Network
from .profile import BenchProfile, OhmRange, bench_profiles, load_bench_profile

__all__ = [
    "BenchProfile", "BenchReading", "Channel", "Equivalents", "Junction", "LCR_QUANTITIES",
    "Network", "OhmRange", "bench_profiles", "channels", "diode_drop", "impedance", "junctions",
    "lcr_reading", "load_bench_profile", "ohms",
]
