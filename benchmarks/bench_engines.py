"""The same board predicted by both engines: time ratio and agreement table.

For every part of the board (by default its two-terminal R, C, L and D
parts), ``incircuit.predict.predict`` runs once with the analytic engine
and once with ngspice. Prints one row per part (both in-circuit readings and
their relative difference), then the totals: CPU time per prediction and per
engine step of each engine (``time.process_time``: ngspice runs inside this
process, and on a busy shared machine wall time mostly measures the other
processes), the ratio ngspice / analytic (goal: at least 30), the kind
mismatches, the worst value differences and the parts an engine could not
simulate.

Usage: python benchmarks/bench_engines.py [BOARD] [--parts N] [--all-kinds]
BOARD is a netlist path or a demo board name (default: power-stage).
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time

from incircuit.chips import apply_pin_roles
from incircuit.demo_boards import DEFAULT_DEMO, resolve_board
from incircuit.engines.ngspice import available
from incircuit.errors import EngineError
from incircuit.netlist import load
from incircuit.predict import Prediction, predict

GOAL_RATIO = 30.0
ENGINES = ("analytic", "ngspice")


def _timed(board, part: str, engine: str) -> tuple[Prediction | EngineError, float, float]:
    cpu, wall = time.process_time(), time.perf_counter()
    try:
        result: Prediction | EngineError = predict(board, part, engine=engine, trace_points=0)
    except EngineError as error:
        result = error
    return result, time.process_time() - cpu, time.perf_counter() - wall


def _steps(p: Prediction) -> int:
    return len(p.in_circuit.steps) + (len(p.isolated.steps) if p.isolated else 0)


def _cell(result: Prediction | EngineError) -> str:
    if isinstance(result, EngineError):
        return f"{'error':12s} {str(result)[:22]:22s}"
    r = result.in_circuit.reading
    value = "" if r.value is None else f"{r.value:.6g}"
    return f"{r.kind:12s} {value:>12s} {r.unit or '':9s}"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("board", nargs="?", default=DEFAULT_DEMO)
    parser.add_argument("--parts", type=int, default=0, help="at most N parts (0: all)")
    parser.add_argument("--all-kinds", action="store_true", help="also transistors")
    args = parser.parse_args(argv)
    reason = available()
    if reason is not None:
        print(f"ngspice not available: {reason}")
        return 1
    path, pins = resolve_board(args.board)
    board = apply_pin_roles(load(path), list(pins), {})
    kinds = ("R", "C", "L", "D", "Q", "M", "J") if args.all_kinds else ("R", "C", "L", "D")
    parts = [p.name for p in board.parts if p.kind in kinds]
    if args.parts:
        parts = parts[: args.parts]
    predict(board, parts[0], engine="ngspice", trace_points=0)  # load libngspice outside the timing

    cpu = {e: 0.0 for e in ENGINES}
    wall = {e: 0.0 for e in ENGINES}
    steps = {e: 0 for e in ENGINES}
    diffs: list[tuple[float, str, str]] = []
    mismatches, failures = [], []
    print(f"board {board.name} ({path}), {len(parts)} parts; in-circuit readings")
    print(f"{'part':8s} {'analytic':35s} {'ngspice':35s} {'diff':>8s}")
    for name in parts:
        results = {}
        for engine in ENGINES:
            result, c, w = _timed(board, name, engine)
            results[engine] = result
            if isinstance(result, EngineError):
                failures.append(f"{name} ({engine}): {result}")
                continue
            cpu[engine] += c
            wall[engine] += w
            steps[engine] += _steps(result)
        a, n = results["analytic"], results["ngspice"]
        diff = ""
        if isinstance(a, Prediction) and isinstance(n, Prediction):
            ra, rn = a.in_circuit.reading, n.in_circuit.reading
            if ra.kind != rn.kind:
                mismatches.append(name)
                diff = "KIND"
            elif ra.value and rn.value is not None:
                rel = rn.value / ra.value - 1.0
                diffs.append((abs(rel), name, f"{rel:+.3%}"))
                diff = f"{rel:+.2%}"
        print(f"{name:8s} {_cell(a):35s} {_cell(n):35s} {diff:>8s}", flush=True)

    done = {e: max(1, len(parts) - sum(1 for f in failures if f"({e})" in f)) for e in ENGINES}
    print()
    for e in ENGINES:
        print(f"{e:9s} CPU {cpu[e]:8.2f} s  ({1e3 * cpu[e] / done[e]:8.1f} ms per prediction, "
              f"{1e3 * cpu[e] / max(1, steps[e]):6.2f} ms per step, {steps[e]} steps), wall {wall[e]:.2f} s")
    ratio = cpu["ngspice"] / cpu["analytic"] if cpu["analytic"] > 0 else float("inf")
    verdict = "meets" if ratio >= GOAL_RATIO else "misses"
    print(f"ratio ngspice / analytic (CPU): {ratio:.1f}x ({verdict} the goal of {GOAL_RATIO:g}x)")
    print(f"kind mismatches: {len(mismatches)} {' '.join(mismatches)}")
    if diffs:
        diffs.sort(reverse=True)
        print(f"median |difference| {statistics.median(d for d, _, _ in diffs):.3%}; worst: "
              + ", ".join(f"{n} {s}" for _, n, s in diffs[:5]))
    for line in failures:
        print(f"failed: {line}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
