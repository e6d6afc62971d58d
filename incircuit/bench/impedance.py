"""Series and parallel equivalents of an impedance, as an LCR meter shows them.

At angular frequency ``w`` an impedance ``Z = Rs + j Xs`` is shown either
as a series pair (Rs with Cs = -1/(w Xs) or Ls = Xs/w) or, from the
admittance ``Y = 1/Z = Gp + j Bp``, as a parallel pair (Rp = 1/Gp with
Cp = Bp/w or Lp = -1/(w Bp)). The dissipation factor is
``D = Rs/|Xs| = Gp/|Bp|`` and the quality factor ``Q = 1/D``
(Horowitz & Hill, *The Art of Electronics*, 3rd ed., ch. 1).

>>> e = Equivalents.of(complex(10.0, -1.0 / (2 * math.pi * 1e3 * 1e-6)), 1e3)
>>> (round(e.cs * 1e6, 6), round(e.rs, 6))
(1.0, 10.0)
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass

__all__ = ["Equivalents"]


def _inv(x: float) -> float:
    return math.inf if x == 0 else 1.0 / x


@dataclass(frozen=True)
class Equivalents:
    """Every view of one complex impedance at one frequency (SI units).

    A reactance of the other sign leaves the capacitance or inductance
    ``None``; ``d`` and ``q`` are ``inf`` for a pure resistance or pure
    reactance respectively.
    """

    frequency: float
    z: complex
    rs: float
    xs: float
    rp: float
    xp: float
    cs: float | None
    ls: float | None
    cp: float | None
    lp: float | None
    d: float
    q: float

    @classmethod
    def of(cls, z: complex, frequency: float) -> "Equivalents":
        w = 2.0 * math.pi * frequency
        rs, xs = z.real, z.imag
        if z == 0 or not math.isfinite(abs(z)):
            y = complex(math.inf) if z == 0 else 0j
        else:
            y = 1.0 / z
        gp, bp = y.real, y.imag
        cs = -1.0 / (w * xs) if xs < 0 else None
        ls = xs / w if xs > 0 else None
        cp = bp / w if bp > 0 else None
        lp = -1.0 / (w * bp) if bp < 0 else None
        d = abs(rs) / abs(xs) if xs != 0 else math.inf
        q = _inv(d) if math.isfinite(d) else 0.0
        return cls(frequency, z, rs, xs, _inv(gp), -_inv(bp) if bp != 0 else math.inf,
                   cs, ls, cp, lp, d, q)

    def value(self, quantity: str) -> float | None:
        """One quantity by its name: ``"rs"``, ``"cp"``, ``"ls"`` ..."""
        return getattr(self, quantity)

    def to_dict(self) -> dict:
        out = asdict(self)
        out["z"] = {"real": self.z.real, "imag": self.z.imag, "magnitude": abs(self.z),
                    "phase_deg": math.degrees(math.atan2(self.z.imag, self.z.real))}
        return out
