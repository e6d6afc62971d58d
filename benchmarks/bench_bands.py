"""Speed of healthy bands and of whole diagnoses.

Prints, per case, the wall time of ``healthy_band`` (500 samples, the
default) with the method it chose ("full": one identification run per
sample; "linear": the checked model of ``incircuit.surrogate``), the number
of identification runs made and the band; then the wall time of a whole
``diagnose`` of a constructed fault. Cases: small linear boards (two
resistors, a reservoir capacitor with a ceramic and a bleeder) and parts of
the demo boards (junctions on the probed piece, so the linear model or its
fallback). Each figure is the best of ``--repeat`` runs, with the worker
processes of ``incircuit.workers`` (set INCIRCUIT_WORKERS=1 for one core):
wall time, and CPU time including the workers (less sensitive to other
load on the machine; the load average is printed).

Goal: 500 samples of one prediction within a few seconds on two cores.

Usage: python benchmarks/bench_bands.py [--repeat N] [--samples N] [--quick]
"""

from __future__ import annotations

import argparse
import os
import time

from incircuit.bands import healthy_band
from incircuit.chips import apply_pin_roles
from incircuit.demo_boards import resolve_board
from incircuit.diagnose import diagnose
from incircuit.model import Board, Part, Tolerance
from incircuit.netlist import load
from incircuit.readings import observation
from incircuit.workers import default_workers

T = Tolerance.symmetric

PAIR = Board("two resistors", (Part("R1", "R", ("A", "B"), 10e3, tolerance=T(0.05)),
                               Part("R2", "R", ("A", "B"), 4.7e3, tolerance=T(0.05))))
RESERVOIR = Board("reservoir, ceramic, bleeder", (
    Part("C1", "C", ("V", "0"), 10e-6, tolerance=T(0.2)),
    Part("C2", "C", ("V", "0"), 100e-9, tolerance=T(0.1)),
    Part("R1", "R", ("V", "0"), 100e3, tolerance=T(0.05))))

DIAGNOSES = [(RESERVOIR, "C1", "4.1uF"), (PAIR, "R1", "4k7"), ("power-stage", "C7", "2.1mF")]

DEMO_PARTS = [("power-stage", "RBLD"), ("power-stage", "C15"), ("relay-driver", "RBE"),
              ("sensor-frontend", "R11")]


def _demo(name: str) -> Board:
    path, pins = resolve_board(name)
    return apply_pin_roles(load(path), pins, {})


def _cpu() -> float:
    t = os.times()
    return t.user + t.system + t.children_user + t.children_system


def _best(repeat: int, func):
    """(best wall seconds, CPU seconds of that run including the workers, result)."""
    best, out = (float("inf"), 0.0), None
    for _ in range(repeat):
        start, cpu = time.perf_counter(), _cpu()
        out = func()
        best = min(best, (time.perf_counter() - start, _cpu() - cpu))
    return best[0], best[1], out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=2)
    ap.add_argument("--samples", type=int, default=500)
    ap.add_argument("--quick", action="store_true", help="skip the demo boards")
    args = ap.parse_args()
    print(f"workers: {default_workers('analytic')} (cores: {os.cpu_count()}), samples: {args.samples}")
    cases = [(PAIR, "R1"), (RESERVOIR, "C1")]
    if not args.quick:
        cases += [(_demo(b), p) for b, p in DEMO_PARTS]
    print(f"load average at start: {os.getloadavg()[0]:.1f}")
    print(f"{'board / part':44} {'method':7} {'runs':>5} {'wall s':>7} {'cpu s':>7}  band")
    for board, part in cases:
        probes = board.part(part).pins
        healthy_band(board, probes, samples=20)  # imports and caches, not timed
        wall, cpu, band = _best(args.repeat, lambda: healthy_band(board, probes, samples=args.samples))
        label = f"{board.name[:34]} / {part}"
        print(f"{label:44} {band.method:7} {band.runs:5d} {wall:7.2f} {cpu:7.2f}  {band.describe()}")
    print()
    print(f"{'diagnosis (constructed fault)':44} {'decision':16} {'wall s':>7} {'cpu s':>7}")
    for board, part, text in DIAGNOSES:
        if isinstance(board, str):
            if args.quick:
                continue
            board = _demo(board)
        obs = [observation(board, part, text)]
        wall, cpu, d = _best(args.repeat, lambda: diagnose(board, part, obs, samples=args.samples))
        label = f"{board.name[:26]} / {part} reads {text}"
        print(f"{label:44} {d.decision:16} {wall:7.2f} {cpu:7.2f}")
    print(f"load average at end: {os.getloadavg()[0]:.1f}")


if __name__ == "__main__":
    main()
