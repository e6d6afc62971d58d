"""Time the netlist importer on generated boards and print the figures.

Usage: python benchmarks/netlist_import.py [N_PARTS ...]   (default: 1000 10000)

Two shapes per size: a flat board of R/C/L/D/Q parts with models and
tolerance comments, and the same number of parts made of subcircuit calls
(10 parts each, with a brace parameter). Goal: 1000 parts well under 1 s.
"""

from __future__ import annotations

import sys
import time

from incircuit.netlist import parse_text


def flat_board(n: int) -> str:
    lines = ["flat benchmark board", ".param rbase=1k", ".model dm D is=1e-14 n=1.8", ".model qn NPN bf=200"]
    for i in range(n):
        a, b = f"n{i}", f"n{i + 1}"
        kind = i % 5
        if kind == 0:
            lines.append(f"R{i} {a} {b} {{rbase*2}} ; tol=1%")
        elif kind == 1:
            lines.append(f"C{i} {a} 0 100n ; tol=-20%/+80% esr=0.1")
        elif kind == 2:
            lines.append(f"L{i} {a} {b} 10u ; dcr=0.2")
        elif kind == 3:
            lines.append(f"D{i} {a} {b} dm")
        else:
            lines.append(f"Q{i} {a} {b} 0 qn")
    return "\n".join(lines) + "\n"


def hierarchical_board(n: int) -> str:
    cell = [".subckt cell a b rv=1k"] + [f"R{j} a m{j} {{rv*{j + 1}}}" for j in range(5)] + \
        [f"C{j} m{j} b 1n" for j in range(5)] + [".ends"]
    calls = [f"X{i} n{i} n{i + 1} cell rv={i + 1}" for i in range(max(n // 10, 1))]
    return "hierarchical benchmark board\n" + "\n".join(cell + calls) + "\n"


def best_of(text: str, repeat: int = 5) -> tuple[float, int]:
    best = float("inf")
    parts = 0
    for _ in range(repeat):
        start = time.perf_counter()
        board = parse_text(text)
        best = min(best, time.perf_counter() - start)
        parts = len(board.parts)
    return best, parts


def main(argv: list[str]) -> int:
    sizes = [int(a) for a in argv] or [1000, 10000]
    print(f"{'shape':<14}{'parts':>8}{'best s':>10}{'us/part':>10}")
    for n in sizes:
        for shape, make in (("flat", flat_board), ("hierarchical", hierarchical_board)):
            seconds, parts = best_of(make(n))
            print(f"{shape:<14}{parts:>8}{seconds:>10.4f}{seconds / parts * 1e6:>10.1f}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
