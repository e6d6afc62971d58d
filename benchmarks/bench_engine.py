"""Speed of the analytic engine: step times and session open times.

Prints, for generated boards whose reduced network has N nets:

* the median time of one tester-like step (discharge, charge through the low
  and the high resistor with a threshold watch, a floating pause, reverse
  drive), for the first run of a session (decompositions computed) and for
  repeated runs (decompositions cached);
* the median time to open a session (elements, reduction) on whole boards of
  100 to 2000 parts;
* with ``--demo``: the median step time of real identification runs on every
  two-pin part of the demo boards.

Times are the CPU time of this process (``time.process_time``), so that other
work on a shared machine does not inflate them; BLAS runs on one thread.

Usage: python benchmarks/bench_engine.py [--repeat N] [--demo]
"""

from __future__ import annotations

import argparse
import statistics
import time

import numpy as np

from incircuit.engines.analytic import ENGINE, AnalyticSession
from incircuit.engines.base import Source, Watch
from incircuit.model import Board, Model, Part

PORT, LOW, HIGH = 21.0, 680.0, 470e3
DISCHARGE = ((Source(PORT, 0.0), Source(PORT, 0.0)), 2e-3, None)
SEQUENCE = (
    DISCHARGE,
    ((Source(LOW, 5.0), Source(PORT, 0.0)), 1e-3, None),
    ((Source(PORT, 0.0), Source(LOW, 5.0)), 1e-3, None),
    DISCHARGE,
    ((Source(HIGH, 5.0), Source(PORT, 0.0)), 0.2, Watch(0, 1.1)),
    ((None, Source(PORT, 0.0)), 2e-3, None),
    DISCHARGE,
    ((Source(LOW, 5.0), Source(PORT, 0.0)), 0.05, Watch(0, 1.1)),
    ((Source(PORT, 0.0), Source(HIGH, 5.0)), 0.1, Watch(1, 0.5, minus=0)),
    DISCHARGE,
)
DMODEL = Model("DB", "D", {"is": 2.5e-9, "n": 1.75, "rs": 0.6, "cjo": 4e-12})


def generated_board(n_nets: int, seed: int, diodes: int = 0, inductors: int = 0) -> Board:
    """A connected board: resistive tree plus extra resistors, capacitors on
    every other net, some diodes and inductors; probes on A and B."""
    rng = np.random.default_rng(seed)
    nets = ["A", "B"] + [f"N{k}" for k in range(n_nets - 2)]
    parts: list[Part] = []
    for k in range(1, len(nets)):
        parts.append(Part(f"R{k}", "R", (nets[k], nets[int(rng.integers(0, k))]), float(10 ** rng.uniform(2, 5))))
    for k in range(n_nets // 2):
        a, b = rng.choice(len(nets), 2, replace=False)
        parts.append(Part(f"RX{k}", "R", (nets[a], nets[b]), float(10 ** rng.uniform(2, 6))))
    for k, net in enumerate(nets[::2]):
        other = nets[int(rng.integers(0, len(nets)))]
        if other != net:
            parts.append(Part(f"C{k}", "C", (net, other), float(10 ** rng.uniform(-10, -5))))
    for k in range(diodes):
        a, b = rng.choice(len(nets), 2, replace=False)
        parts.append(Part(f"D{k}", "D", (nets[a], nets[b]), model="DB"))
    for k in range(inductors):
        a, b = rng.choice(len(nets), 2, replace=False)
        parts.append(Part(f"L{k}", "L", (nets[a], nets[b]), float(10 ** rng.uniform(-6, -3)), params={"dcr": 1.0}))
    return Board(f"gen{n_nets}", tuple(parts), {"DB": DMODEL})


def whole_board(n_parts: int, seed: int) -> Board:
    """A board-like netlist of about ``n_parts`` parts: rails with decoupling,
    resistor networks, diodes, a few inductors, and islands of its own."""
    rng = np.random.default_rng(seed)
    n_nets = max(10, n_parts // 3)
    nets = ["GND", "VCC"] + [f"N{k}" for k in range(n_nets)]
    parts: list[Part] = []
    kinds = rng.choice(["R", "R", "R", "C", "C", "D", "L"], size=n_parts)
    for k, kind in enumerate(kinds):
        a = nets[int(rng.integers(0, len(nets)))]
        b = "GND" if rng.random() < 0.3 else nets[int(rng.integers(0, len(nets)))]
        if a == b:
            b = "VCC"
        if kind == "R":
            parts.append(Part(f"R{k}", "R", (a, b), float(10 ** rng.uniform(1, 6))))
        elif kind == "C":
            if rng.random() < 0.4:
                a, b = "VCC", "GND"
            parts.append(Part(f"C{k}", "C", (a, b), float(10 ** rng.uniform(-11, -4))))
        elif kind == "D":
            parts.append(Part(f"D{k}", "D", (a, b), model="DB"))
        else:
            parts.append(Part(f"L{k}", "L", (a, b), float(10 ** rng.uniform(-6, -3)), params={"dcr": 0.5}))
    return Board(f"whole{n_parts}", tuple(parts), {"DB": DMODEL})


def step_times(board: Board, repeat: int) -> tuple[float, float, int]:
    """Median step time of the first run and of repeated runs; reduced net count."""
    cold, warm = [], []
    n = 0
    for r in range(repeat):
        s = ENGINE.open(board, ("A", "B"), 30e-12)
        n = len(s.network.nets)
        for drive, duration, watch in SEQUENCE:
            t0 = time.process_time()
            s.run(drive, duration, watch=watch, sample_times=(1e-6, 1e-4))
            cold.append(time.process_time() - t0)
        for drive, duration, watch in SEQUENCE:
            t0 = time.process_time()
            s.run(drive, duration, watch=watch, sample_times=(1e-6, 1e-4))
            warm.append(time.process_time() - t0)
    return statistics.median(cold), statistics.median(warm), n


def open_time(board: Board, repeat: int) -> tuple[float, int]:
    times = []
    n = 0
    for _ in range(repeat):
        t0 = time.process_time()
        s = ENGINE.open(board, ("VCC", "N1"), 30e-12)
        times.append(time.process_time() - t0)
        n = len(s.network.nets)
    return statistics.median(times), n


def demo_steps() -> None:
    from incircuit.chips import apply_pin_roles
    from incircuit.demo_boards import demo_board_paths, resolve_board
    from incircuit.errors import EngineError
    from incircuit.netlist import load
    from incircuit.predict import identify
    from incircuit.tester.profile import load_profile

    times: list[float] = []
    original = AnalyticSession.run

    def timed(self, *args, **kw):
        t0 = time.process_time()
        out = original(self, *args, **kw)
        times.append(time.process_time() - t0)
        return out

    AnalyticSession.run = timed  # type: ignore[method-assign]
    profile = load_profile()
    try:
        for name in sorted(demo_board_paths()):
            path, pins = resolve_board(name)
            board = apply_pin_roles(load(path), pins, {})
            start = len(times)
            t0 = time.process_time()
            runs = 0
            for part in board.parts:
                if part.kind in ("R", "C", "L", "D") and len(set(part.pins)) == 2:
                    try:
                        identify(board, part.pins, profile)
                        runs += 1
                    except EngineError:
                        pass
            mine = times[start:]
            if mine:
                print(f"  demo {name}: {runs} runs, {len(mine)} steps, median step "
                      f"{statistics.median(mine) * 1e3:.3f} ms, p90 {np.percentile(mine, 90) * 1e3:.3f} ms, "
                      f"per run {(time.process_time() - t0) / max(runs, 1) * 1e3:.1f} ms")
    finally:
        AnalyticSession.run = original  # type: ignore[method-assign]


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--demo", action="store_true", help="also time identification runs on the demo boards")
    args = ap.parse_args()
    print("step time (median over a tester-like sequence), first run / cached:")
    for n in (10, 20, 50):
        for label, kw in (("RC", {}), ("RC+4 diodes", {"diodes": 4}), ("RLC", {"inductors": 3})):
            cold, warm, kept = step_times(generated_board(n, 1, **kw), args.repeat)
            print(f"  {label:12s} {n:3d} nets -> {kept:3d} kept: {cold * 1e3:7.3f} ms / {warm * 1e3:7.3f} ms")
    print("session open (elements + reduction) on whole boards:")
    for n in (100, 500, 2000):
        t, kept = open_time(whole_board(n, 2), args.repeat)
        print(f"  {n:5d} parts -> {kept:4d} kept nets: {t * 1e3:8.2f} ms")
    if args.demo:
        print("identification runs on the demo boards:")
        demo_steps()
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
