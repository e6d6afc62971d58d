"""incircuit: what a three-probe component tester reads on a part still soldered to its board.

Importing this package pulls in no simulator; the ngspice engine loads only
when asked for.
"""

__version__ = "0.1.0"
