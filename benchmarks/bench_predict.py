"""Time per prediction (isolated + in-circuit identification) on real-sized boards.

Prints, per board, the median, 90th percentile and worst time of
``predict(board, part)`` over its two-terminal parts (R, C, L, D), how many
failed with an EngineError, and the mean engine steps per prediction. Times
are CPU time of this process (``time.process_time``; on a busy shared
machine wall time mostly measures the other processes), with the median
wall time beside it. Boards: the
demo netlists (``netlists/*.cir`` with their pin-role files) and a generated
500-part board (50 seeded input channels on shared rails, see
:func:`generated_board`). Goal: median under 50 ms per part on a 2-core machine.

Usage: python benchmarks/bench_predict.py [--parts N] [--trace-points K] [--engine NAME]
"""

from __future__ import annotations

import argparse
import random
import statistics
import sys
import time
from pathlib import Path

from incircuit.chips import apply_pin_roles
from incircuit.errors import EngineError
from incircuit.model import Board, Model, Part
from incircuit.netlist import load
from incircuit.predict import predict

GOAL_MS = 50.0
ROOT = Path(__file__).resolve().parents[1]


def demo_boards() -> list[Board]:
    boards = []
    for path in sorted((ROOT / "netlists").glob("*.cir")):
        pins = path.with_suffix(".pins.toml")
        board = load(str(path))
        boards.append(apply_pin_roles(board, [str(pins)] if pins.is_file() else [], {}))
    return boards


def generated_board(cells: int = 50, seed: int = 7) -> Board:
    """A seeded 10-parts-per-cell board: ``cells`` input channels on shared rails.

    Each channel: an input inductor with a termination resistor, a pull-up
    to VCC, an RC low-pass in two stages, clamp diodes from the output to
    both rails and a decoupling capacitor on the rails (E6 values, seeded).
    Through the rails every part is joined to every other, as on a real
    board; 50 cells give 500 parts.
    """
    rng = random.Random(seed)
    e6 = (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)

    def pick(lo: int, hi: int) -> float:
        return rng.choice(e6) * 10.0 ** rng.randint(lo, hi)
    parts: list[Part] = []
    for k in range(cells):
        s, i, m, o = f"S{k}", f"IN{k}", f"M{k}", f"OUT{k}"
        parts += [
            Part(f"L{k}", "L", (s, i), pick(-6, -4), params={"dcr": pick(-1, 0)}),
            Part(f"RT{k}", "R", (s, "GND"), pick(4, 5)),
            Part(f"RP{k}", "R", ("VCC", i), pick(4, 4)),
            Part(f"RA{k}", "R", (i, m), pick(3, 4)),
            Part(f"CA{k}", "C", (m, "GND"), pick(-9, -7)),
            Part(f"RB{k}", "R", (m, o), pick(2, 3)),
            Part(f"CB{k}", "C", (o, "GND"), pick(-10, -8)),
            Part(f"DH{k}", "D", (o, "VCC"), model="DGEN"),
            Part(f"DL{k}", "D", ("GND", o), model="DGEN"),
            Part(f"CD{k}", "C", ("VCC", "GND"), pick(-7, -5) if k else 470e-6),
        ]
    models = {"DGEN": Model("DGEN", "D", {"is": 2.52e-9, "n": 1.752, "rs": 0.568})}
    return Board(f"generated {len(parts)}-part board ({cells} channels)", tuple(parts), models)


def bench(board: Board, limit: int | None, trace_points: int, engine: str) -> None:
    parts = [p for p in board.parts if p.kind in "RCLD" and len(set(p.pins)) == 2]
    if limit is not None and len(parts) > limit:
        parts = random.Random(1).sample(parts, limit)
    times, walls, steps, failed, broken = [], [], [], [], []
    for part in parts:
        t0, w0 = time.process_time(), time.perf_counter()
        try:
            pred = predict(board, part.name, engine=engine, trace_points=trace_points)
        except EngineError as error:
            failed.append(f"{part.name}: {error.message}")
            continue
        except Exception as error:  # an internal error: reported, the other parts go on
            broken.append(f"{part.name}: {type(error).__name__}: {error}")
            continue
        finally:
            times.append(time.process_time() - t0)
            walls.append(time.perf_counter() - w0)
        steps.append(len(pred.in_circuit.steps) + len(pred.isolated.steps))
    times_ms = sorted(t * 1e3 for t in times)
    p90 = times_ms[int(0.9 * (len(times_ms) - 1))]
    flag = "ok" if statistics.median(times_ms) < GOAL_MS else "over goal"
    print(f"{board.name[:48]:48s} {len(board.parts):4d} parts, {len(parts):3d} predicted: "
          f"CPU median {statistics.median(times_ms):7.1f} ms  p90 {p90:7.1f} ms  max {times_ms[-1]:8.1f} ms  "
          f"(wall median {statistics.median(walls) * 1e3:7.1f} ms)  "
          f"steps/prediction {statistics.mean(steps) if steps else 0:5.1f}  engine errors {len(failed)}  "
          f"internal errors {len(broken)}  [{flag}]")
    for line in failed + broken:
        print(f"    {line}")
    sys.stdout.flush()


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--parts", type=int, default=60, help="parts predicted per board at most (default 60)")
    parser.add_argument("--trace-points", type=int, default=0, help="trace samples per step (default 0)")
    parser.add_argument("--engine", default="analytic")
    args = parser.parse_args(argv)
    print(f"predict(): isolated + in-circuit run per part; engine {args.engine}, "
          f"trace points {args.trace_points}; goal median < {GOAL_MS:g} ms")
    for board in [*demo_boards(), generated_board()]:
        bench(board, args.parts, args.trace_points, args.engine)
    return 0


if __name__ == "__main__":
    sys.exit(main())
