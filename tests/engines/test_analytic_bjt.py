"""Bipolar transistor action in the analytic engine.

References:
* Ebers-Moll transport model (Ebers & Moll, Proc. IRE 42, 1954; Sze,
  Physics of Semiconductor Devices, 3rd ed., ch. 5): ``Ic = Is (e^{Vbe/Vt} -
  e^{Vbc/Vt}) - Is/BR (e^{Vbc/Vt} - 1)``, ``Ib = Is/BF (e^{Vbe/Vt} - 1) +
  Is/BR (e^{Vbc/Vt} - 1)``: forward-active ``Ic = BF Ib`` and
  ``Vbe = NF Vt ln(1 + Ic/Is)``; reverse-active ``Ie = BR Ib``; saturation
  ``Vce = Vt ln(X / Y)`` with ``X = Ic + Y/alpha_R``,
  ``Y = (Ib - Ic/BF) / (1/(alpha_R BF) + 1/BR)``, ``alpha_R = BR/(1+BR)``.
* The engine's chords lie below the exponential by at most
  ``chord_error(sqrt(10)) n Vt`` (4.2 mV for n = 1; incircuit.engines.pwl).
* The general (unsymmetric) closed form against scipy's matrix exponential.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.linalg as sla

from incircuit.engines import get_engine
from incircuit.engines.base import Source
from incircuit.engines.general import GeneralStatic, general_decompose
from incircuit.engines.ngspice import available
from incircuit.engines.pwl import VT, chord_error
from incircuit.engines.solve import Static, decompose, make_split
from incircuit.model import Board, Model, Part

ENGINE = get_engine("analytic")
CHORD = chord_error(math.sqrt(10.0)) * VT  # 4.2 mV at n = 1
IS, BF, BR = 1e-14, 150.0, 3.0
NPN = Model("QN", "NPN", {"is": IS, "bf": BF, "br": BR})
PNP = Model("QP", "PNP", {"is": IS, "bf": BF, "br": BR})


def bias(model: Model, rb: float, rc: float, vs: float = 5.0, engine: str = "analytic",
         swap: bool = False) -> tuple[float, float, float, float]:
    """(Ib, Ic, Vbe, Vce) of a common-emitter stage: base and collector fed
    through rb and rc from the supply (NPN) or to 0 V (PNP), emitter at the
    other rail. ``swap`` puts the collector pin on the emitter net."""
    pins = ("E", "B", "C") if swap else ("C", "B", "E")
    board = Board("t", (Part("Q1", "Q", pins, model=model.name),), {model.name: model})
    s = get_engine(engine).open(board, ("B", "C", "E"), 1e-12)
    npn = model.type == "NPN"
    top, bottom = (vs, 0.0) if npn else (0.0, vs)
    r = s.run((Source(rb, top), Source(rc, top), Source(1e-3, bottom)), 0.05)
    vb, vc, ve = r.volts
    sign = 1.0 if npn else -1.0
    return sign * (top - vb) / rb, sign * (top - vc) / rc, sign * (vb - ve), sign * (vc - ve)


@pytest.mark.parametrize("model", [NPN, PNP], ids=["npn", "pnp"])
@pytest.mark.parametrize("rb", [470e3, 1e6])
def test_forward_active_gain_is_bf_and_vbe_follows_the_diode_law(model, rb):
    ib, ic, vbe, vce = bias(model, rb, 700.0)
    assert vce > 1.0  # forward-active
    # Ic = BF Ib: both come from the same chord current; GMIN (1e-12 S, across
    # each junction and to ground) times up to 5 V, amplified by BF + 1, is at
    # most 1e-4 of a 9 uA base current
    assert ic / ib == pytest.approx(BF, rel=1e-4)
    # Vbe = Vt ln(1 + Ic/Is) (Sze), chords at most CHORD low
    exact = VT * math.log1p(ic / IS)
    assert exact - CHORD - 1e-6 <= vbe <= exact + 1e-6


@pytest.mark.parametrize("model", [NPN, PNP], ids=["npn", "pnp"])
def test_reverse_active_gain_is_br(model):
    # collector and emitter swapped: the emitter now collects, Ie = BR Ib
    ib, ic, vbe, vce = bias(model, 470e3, 700.0, swap=True)
    assert vce > 1.0
    assert ic / ib == pytest.approx(BR, rel=1e-4)  # GMIN leakage, as above


@pytest.mark.parametrize("model", [NPN, PNP], ids=["npn", "pnp"])
def test_saturation_voltage_follows_ebers_moll(model):
    ib, ic, vbe, vce = bias(model, 4.7e3, 10e3)  # forced gain Ic/Ib ~ 0.5 mA / 0.9 mA << BF
    assert ic < BF * ib / 10
    alpha_r = BR / (1 + BR)
    y = (ib - ic / BF) / (1 / (alpha_r * BF) + 1 / BR)
    x = ic + y / alpha_r
    exact = VT * math.log(x / y)
    # each junction's chord error lies in [-CHORD, 0]: their difference within +-CHORD
    assert vce == pytest.approx(exact, abs=CHORD + 1e-6)
    assert 0.0 < vce < 0.2


def test_general_closed_form_matches_the_matrix_exponential():
    # a capacitive network with a transconductance (unsymmetric G):
    # x(t) from the general modal form against expm of the ODE (scipy)
    rng = np.random.default_rng(7)
    n = 4
    G = np.diag(rng.uniform(1e-4, 1e-3, n))
    for i in range(n - 1):
        g = rng.uniform(1e-4, 1e-3)
        G[i, i] += g
        G[i + 1, i + 1] += g
        G[i, i + 1] -= g
        G[i + 1, i] -= g
    G[3, 1] += 5e-3  # node 3 draws gm * V1
    G[2, 1] -= 5e-3
    C = np.diag([1e-9, 2e-9, 0.0, 4.7e-9])
    b = np.array([1e-3, 0.0, 0.0, 0.0])
    st = GeneralStatic(make_split(C, np.diag(C) > 0), G, np.zeros((n, 0)))
    dec = general_decompose(st, np.zeros((0, 0)))
    traj = dec.start(np.zeros(n), np.zeros(0), b)
    # reference: eliminate the algebraic node 2, integrate y' = F y + g exactly
    dyn = [0, 1, 3]
    H = 1.0 / G[2, 2]
    Gr = G[np.ix_(dyn, dyn)] - np.outer(G[dyn, 2], G[2, dyn]) * H
    F = -np.linalg.solve(C[np.ix_(dyn, dyn)], Gr)
    g = np.linalg.solve(C[np.ix_(dyn, dyn)], b[dyn])
    aug = np.zeros((4, 4))
    aug[:3, :3] = F
    aug[:3, 3] = g
    for t in (1e-7, 1e-6, 1e-5):
        y = (sla.expm(aug * t) @ np.array([0, 0, 0, 1.0]))[:3]
        x = traj.nets(np.array([t]))[0]
        # rtol 1e-8: both are exact up to rounding of the eigen-decomposition
        assert x[dyn] == pytest.approx(y, rel=1e-8, abs=1e-12)


def test_general_form_equals_the_symmetric_one_on_a_symmetric_network():
    # no transconductance: both decompositions describe the same RC network
    G = np.array([[2e-3, -1e-3, 0.0], [-1e-3, 3e-3, -2e-3], [0.0, -2e-3, 2.5e-3]])
    C = np.diag([1e-9, 0.0, 3e-9])
    split = make_split(C, np.diag(C) > 0)
    b = np.array([5e-3, 0.0, 0.0])
    a = decompose(Static(split, G, np.zeros((3, 0))), np.zeros((0, 0))).start(np.zeros(3), np.zeros(0), b)
    g = general_decompose(GeneralStatic(split, G, np.zeros((3, 0))), np.zeros((0, 0))).start(
        np.zeros(3), np.zeros(0), b)
    t = np.array([0.0, 1e-7, 1e-6, 1e-5])
    assert g.nets(t) == pytest.approx(a.nets(t), rel=1e-9, abs=1e-12)


GP_PLAIN = Model("QG", "NPN", {"is": 2e-14, "bf": 180.0, "br": 4.0, "nf": 1.0, "nr": 1.0})


@pytest.mark.skipif(available() is not None, reason=f"ngspice not available: {available()}")
def test_gain_and_vbe_agree_with_ngspice():
    # Gummel-Poon with vaf = ikf = inf and no leakage is Ebers-Moll: hFE = BF
    # (ngspice manual, BJT model); ngspice's time-step error is far below 1e-3.
    ib_a, ic_a, vbe_a, _ = bias(GP_PLAIN, 470e3, 700.0)
    ib_n, ic_n, vbe_n, _ = bias(GP_PLAIN, 470e3, 700.0, engine="ngspice")
    assert ic_n / ib_n == pytest.approx(180.0, rel=1e-3)
    assert ic_a / ib_a == pytest.approx(ic_n / ib_n, rel=1e-3)
    assert vbe_n - CHORD - 1e-4 <= vbe_a <= vbe_n + 1e-4
