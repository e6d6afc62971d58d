"""Cross-check: the tester's identification run on ngspice and on the analytic engine.

Seeded random networks of resistors, capacitors (some with ESR), inductors
(with DC resistance) and silicon diodes between the two probes and up to
two inner nets go through :func:`incircuit.predict.identify` on both
engines. Both must give the same reading kind on every network, and the
same primary value within

* 0.5 % on linear networks: both engines solve the same linear circuit; the
  remaining difference is ngspice's time-step error (below 3e-4 V on 5 V,
  measured) seen through the tester's 10-bit quantisation;
* 2 % with junctions: the analytic engine's piecewise-linear diode is low
  by up to 0.163 n Vt between its knots (incircuit.engines.pwl; 8.4 mV for
  n = 2, 1.3 % of a 0.65 V forward voltage), the rest is quantisation.

The worst cases are printed (visible in the CI log) so that a drift shows
before it fails. Diode parameters span silicon small-signal and rectifier
diodes (is 1e-14..1e-8 A, n 1..2, rs 0.1..2 ohm; common practice).
"""

from __future__ import annotations

import numpy as np
import pytest

from incircuit.engines.ngspice import available
from incircuit.model import Board, Model, Part
from incircuit.predict import identify
from incircuit.tester.profile import load_profile

REASON = available()
pytestmark = [
    pytest.mark.slow,
    pytest.mark.skipif(REASON is not None, reason=f"ngspice not available: {REASON}"),
]

#: Networks per kind: about 0.2-0.4 s of ngspice each (measured on 2 cores).
LINEAR_SEEDS = range(0, 24)
JUNCTION_SEEDS = range(1000, 1024)
PROBES = ("P0", "P1")


def random_board(seed: int, junctions: bool) -> Board:
    """1-4 parts; the first between the probes, the others anywhere."""
    rng = np.random.default_rng(seed)
    nets = [*PROBES, *(f"N{k}" for k in range(int(rng.integers(0, 3))))]
    kinds = ["R", "C", "L"] + (["D"] if junctions else [])
    parts: list[Part] = []
    models: dict[str, Model] = {}
    for i in range(int(rng.integers(1, 5))):
        kind = str(rng.choice(kinds))
        a, b = (0, 1) if i == 0 else rng.choice(len(nets), 2, replace=False)
        pins = (nets[a], nets[b])
        name = f"{kind}{i + 1}"
        if kind == "R":
            parts.append(Part(name, "R", pins, float(10 ** rng.uniform(1, 6))))
        elif kind == "C":
            esr = {"esr": float(10 ** rng.uniform(-2, 0.5))} if rng.random() < 0.5 else {}
            parts.append(Part(name, "C", pins, float(10 ** rng.uniform(-10, -4)), params=esr))
        elif kind == "L":
            parts.append(Part(name, "L", pins, float(10 ** rng.uniform(-5, -2)),
                              params={"dcr": float(10 ** rng.uniform(-1, 1.5))}))
        else:
            model = f"DSI{i}"
            models[model] = Model(model, "D", {
                "is": float(10 ** rng.uniform(-14, -8)), "n": float(rng.uniform(1.0, 2.0)),
                "rs": float(rng.uniform(0.1, 2.0)), "cjo": float(10 ** rng.uniform(-12, -10)),
            })
            parts.append(Part(name, "D", pins, model=model))
    return Board(f"random-{seed}", tuple(parts), models)


def _cross_check(seeds, rtol: float, capsys) -> None:
    profile = load_profile()
    rows = []
    for seed in seeds:
        board = random_board(seed, seeds is JUNCTION_SEEDS)
        a = identify(board, PROBES, profile, "analytic", trace_points=0).reading
        n = identify(board, PROBES, profile, "ngspice", trace_points=0).reading
        rel = None
        if a.value is not None and n.value is not None and a.value != 0:
            rel = n.value / a.value - 1.0
        parts = " ".join(f"{p.name}={p.value:.3g}" if p.value else p.name for p in board.parts)
        rows.append((seed, parts, a, n, rel))
    worst = sorted(rows, key=lambda r: -abs(r[4] or 0.0))[:5]
    with capsys.disabled():
        print(f"\nngspice vs analytic, {len(rows)} networks, worst value differences:")
        for seed, parts, a, n, rel in worst:
            print(f"  seed {seed}: {parts}: {a.kind} {a.value:.6g} vs {n.kind} {n.value:.6g} ({rel:+.3%})"
                  if rel is not None else f"  seed {seed}: {parts}: {a.kind} vs {n.kind}")
    for seed, parts, a, n, rel in rows:
        assert a.kind == n.kind, f"seed {seed} ({parts}): analytic {a} but ngspice {n}"
        assert (a.value is None) == (n.value is None), f"seed {seed} ({parts})"
        if rel is not None:
            assert abs(rel) <= rtol, f"seed {seed} ({parts}): {a.value} vs {n.value}"


def test_linear_networks_read_alike(capsys):
    _cross_check(LINEAR_SEEDS, 0.005, capsys)


def test_networks_with_junctions_read_alike(capsys):
    _cross_check(JUNCTION_SEEDS, 0.02, capsys)
