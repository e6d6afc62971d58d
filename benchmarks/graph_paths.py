"""Time the path search and the DC resistance around parts, and print the figures.

Usage: python benchmarks/graph_paths.py [N_PARTS ...]   (default: 300 1000 3000)

First every part of each demo board (what a survey asks for), then a
generated board of N parts per size: a mesh of nets joined by resistors,
capacitors, inductors and diodes, with a ground net shared by a tenth of the
parts and one 16-pin unmodelled chip, timed on 30 random two-pin parts.
Times are CPU seconds of this process (steady on a shared machine).
Goal: a whole demo board in well under a second; a part of a 1000-part
board in well under a second.
"""

from __future__ import annotations

import random
import sys
import time

from incircuit.chips import apply_pin_roles
from incircuit.demo_boards import demo_board_paths, demo_pin_files
from incircuit.graph import surroundings
from incircuit.model import Board, Model, Part
from incircuit.netlist import load


def generated_board(n: int, seed: int = 1) -> Board:
    rng = random.Random(seed)
    nets = [f"N{i}" for i in range(max(4, n // 3))]
    parts = []
    for i in range(n):
        a = rng.choice(nets)
        b = "0" if rng.random() < 0.1 else rng.choice(nets)
        if a == b:
            b = nets[(nets.index(a) + 1) % len(nets)]
        kind = rng.choices("RCLD", weights=(5, 4, 1, 1))[0]
        value = {"R": 10 ** rng.uniform(1, 6), "C": 10 ** rng.uniform(-11, -4), "L": 1e-6, "D": None}[kind]
        parts.append(Part(f"{kind}{i}", kind, (a, b), value, model="DM" if kind == "D" else None))
    parts.append(Part("U1", "X", tuple(rng.sample(nets, 15)) + ("0",), model="CHIP16"))
    return Board(f"generated-{n}", tuple(parts), {"DM": Model("DM", "D", {"is": 1e-14})})


def time_parts(board: Board, names: list[str]) -> tuple[float, float, int]:
    worst, total, cut = 0.0, 0.0, 0
    for name in names:
        t0 = time.process_time()
        s = surroundings(board, name)
        dt = time.process_time() - t0
        total += dt
        worst = max(worst, dt)
        cut += any(pair.truncated for pair in s.pairs)
    return total, worst, cut


def main(argv: list[str]) -> None:
    for name, path in demo_board_paths().items():
        board = apply_pin_roles(load(str(path)), [str(p) for p in demo_pin_files(name)])
        names = [p.name for p in board.parts if p.kind != "K"]
        total, worst, cut = time_parts(board, names)
        print(f"{name:16s} {len(names):4d} parts: all {total * 1e3:7.1f} ms, "
              f"worst part {worst * 1e3:6.1f} ms, lists cut for {cut} parts")
    for n in [int(a) for a in argv] or [300, 1000, 3000]:
        board = generated_board(n)
        rng = random.Random(2)
        names = rng.sample([p.name for p in board.parts if p.kind != "X"], 30)
        total, worst, cut = time_parts(board, names)
        print(f"generated {n:6d} parts: {total / len(names) * 1e3:7.1f} ms per part, "
              f"worst {worst * 1e3:7.1f} ms, lists cut for {cut} of {len(names)}")


if __name__ == "__main__":
    main(sys.argv[1:])
