"""Pin roles on the exported-style demo board: cost, and predictions with and without them.

Prints the wall time of applying pin roles (files, library, guesses) and of
``circuit.elements``, the number of elements the unmodelled parts add, then
predicts every modelled part of netlists/exported-controller.cir once with
its pin-role file and once without, and prints per case: predictions made,
engine failures (with the parts), predictions marked uncertain, and the
median and total wall time.

Goal: with the pin-role file every part gets a prediction and none is marked
uncertain; without it every prediction whose probes touch a guessed or
unknown pin is marked.

Usage: python benchmarks/bench_pin_roles.py [--engine analytic|ngspice] [--repeat N]
"""

from __future__ import annotations

import argparse
import statistics
import time
from pathlib import Path

from incircuit.chips import apply_pin_roles, uncertainty_reasons
from incircuit.circuit import elements
from incircuit.errors import EngineError
from incircuit.netlist import load
from incircuit.predict import predict

ROOT = Path(__file__).resolve().parents[1]
BOARD = ROOT / "netlists" / "exported-controller.cir"
PINS = ROOT / "netlists" / "exported-controller.pins.toml"


def _best(fn, repeat: int) -> tuple[float, object]:
    best, out = float("inf"), None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t)
    return best, out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--engine", default="analytic")
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()
    raw = load(str(BOARD))
    for label, files in (("with pin-role file", [str(PINS)]), ("without (guesses)", [])):
        t_apply, board = _best(lambda: apply_pin_roles(raw, files), args.repeat)
        t_elems, circuit = _best(lambda: elements(board), args.repeat)
        added = sum(1 for e in circuit.elements if board.part(e.part).kind == "X")
        print(f"{label}: apply_pin_roles {t_apply * 1e3:.1f} ms, elements {t_elems * 1e3:.1f} ms, "
              f"{added} elements from unmodelled parts")
        times, failed, marked = [], [], 0
        for part in board.parts:
            if part.kind == "X":
                continue
            t = time.perf_counter()
            try:
                found = predict(board, part.name, engine=args.engine)
            except EngineError:
                failed.append(part.name)
                continue
            finally:
                times.append(time.perf_counter() - t)
            marked += bool(uncertainty_reasons(board, found.probes))
        made = len(times) - len(failed)
        print(f"  {args.engine}: {made} predictions, {len(failed)} engine failures "
              f"{failed if failed else ''}, {marked} marked uncertain; median "
              f"{statistics.median(times):.2f} s, total {sum(times):.1f} s")


if __name__ == "__main__":
    main()
