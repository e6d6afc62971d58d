"""Time the judge on every two-pin part of the demo boards (analytic engine).

Prints, per board, the verdict counts, the identification runs simulated and
reused, and the CPU seconds of the judge per part (median and worst; CPU time,
not wall time, so other work on the machine does not inflate it), then the
totals. The prediction itself (two runs) is not counted.
Usage: python benchmarks/judge_speed.py [BOARD ...]   (demo names; default: all)
"""

from __future__ import annotations

import statistics
import sys
import time
from collections import Counter

from incircuit.chips import apply_pin_roles
from incircuit.demo_boards import demo_board_paths, resolve_board
from incircuit.judge import judge
from incircuit.judge.runs import RUN_FAILURES
from incircuit.netlist import load
from incircuit.predict import predict
from incircuit.tester.profile import load_profile


def main(names: list[str]) -> int:
    profile = load_profile()
    all_times: list[float] = []
    for name in names or sorted(demo_board_paths()):
        path, pins = resolve_board(name)
        board = apply_pin_roles(load(path), pins, {})
        verdicts: Counter[str] = Counter()
        times, simulated, reused, failed = [], 0, 0, 0
        for part in board.parts:
            if part.kind not in ("R", "C", "L", "D", "Q", "M", "J") or len(set(part.pins)) < 2:
                continue
            try:
                prediction = predict(board, part.name, profile=profile)
            except RUN_FAILURES as error:  # the prediction itself; the judge tolerates its own
                failed += 1
                print(f"  {part.name}: prediction failed: {type(error).__name__}: {error}")
                continue
            started = time.process_time()
            j = judge(board, part.name, prediction, profile)
            times.append(time.process_time() - started)
            if j.cost["runs_failed"]:
                print(f"  {part.name}: {j.cost['runs_failed']} extra runs failed")
            verdicts[j.verdict] += 1
            simulated += j.cost["runs_simulated"]
            reused += j.cost["runs_reused"]
        all_times += times
        if times:
            print(f"{name}: {len(times)} parts ({failed} failed), verdicts {dict(verdicts)}, "
                  f"runs {simulated} simulated + {reused} reused, "
                  f"CPU s per part median {statistics.median(times):.3f} worst {max(times):.3f}")
    if all_times:
        print(f"all: {len(all_times)} parts, CPU s per part median {statistics.median(all_times):.3f}, "
              f"mean {statistics.mean(all_times):.3f}, worst {max(all_times):.3f}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
