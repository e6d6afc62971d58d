"""Survey a generated 1,000-part board with the analytic engine: time and peak memory.

The board is invented for the benchmark: ``N`` input channels of five parts
each (series resistor, filter capacitor, pull-down, clamp diode to a shared
rail, output resistor) on a common ground and a common clamp rail with its
bulk capacitor, so every part shares a connected board with every other
(the worst case for the simulation: nothing is isolated). Values are drawn
from the E12 series (IEC 60063) with a fixed seed.

Prints the wall time, the CPU time of this process and its workers, the
peak resident memory (``resource.getrusage``; the largest process) and the
peak Python heap of the main process (``tracemalloc``), per phase, against
the goals: under 60 s and under 1 GiB on a 2-core machine.

Usage::

    python benchmarks/bench_survey.py [--parts 1000] [--jobs 2] [--depth quick]
                                      [--limit N] [--no-advice] [--no-plots]
                                      [--verbose] [--report DIR]

``--limit N`` surveys only the first N parts (the board stays whole) and
extrapolates the time to all parts, for a quick look.
"""

from __future__ import annotations

import argparse
import random
import resource
import sys
import tempfile
import time
import tracemalloc

from incircuit.model import Board, Model, Part, Tolerance
from incircuit.report import write_report
from incircuit.survey import Settings, survey
from incircuit.tester.profile import load_profile

E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
GOAL_SECONDS = 60.0
GOAL_BYTES = 1 << 30


def e12(rng: random.Random, low_decade: int, high_decade: int) -> float:
    return rng.choice(E12) * 10.0 ** rng.randint(low_decade, high_decade)


def generate(parts: int = 1000, seed: int = 1) -> Board:
    """A board of ``parts`` parts: channels of five, a bulk capacitor, rail capacitors."""
    rng = random.Random(seed)
    tol = {"R": Tolerance.symmetric(0.01), "C": Tolerance.symmetric(0.10)}
    out = [Part("CBULK", "C", ("VCLAMP", "0"), 100e-6, tolerance=tol["C"])]
    for k in range(1, (parts - 1) // 5 + 1):
        n = f"N{k}"
        out += [
            Part(f"R{k}A", "R", (f"IN{k}", n), e12(rng, 3, 4), tolerance=tol["R"]),
            Part(f"C{k}", "C", (n, "0"), e12(rng, -9, -7), tolerance=tol["C"]),
            Part(f"R{k}B", "R", (n, "0"), e12(rng, 4, 5), tolerance=tol["R"]),
            Part(f"D{k}", "D", (n, "VCLAMP"), model="DCLAMP"),
            Part(f"R{k}C", "R", (n, f"OUT{k}"), e12(rng, 2, 3), tolerance=tol["R"]),
        ]
    for i in range(parts - len(out)):  # pad with rail capacitors to exactly ``parts``
        out.append(Part(f"CR{i + 1}", "C", ("VCLAMP", "0"), 100e-9, tolerance=tol["C"]))
    models = {"DCLAMP": Model("DCLAMP", "D", {"is": 2.5e-9, "n": 1.75, "rs": 0.6, "cjo": 2e-12})}
    return Board(f"generated board of {len(out)} parts", tuple(out), models)


def _peak_rss_mib() -> tuple[float, float]:
    own = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
    children = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024.0
    return own, children


def _cpu() -> float:
    a, b = resource.getrusage(resource.RUSAGE_SELF), resource.getrusage(resource.RUSAGE_CHILDREN)
    return a.ru_utime + a.ru_stime + b.ru_utime + b.ru_stime


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--parts", type=int, default=1000)
    ap.add_argument("--jobs", type=int, default=2)
    ap.add_argument("--depth", default="quick", choices=("quick", "standard", "full"))
    ap.add_argument("--limit", type=int, default=0, help="survey only the first N parts")
    ap.add_argument("--no-advice", action="store_true", help="leave out the bench-instrument advice")
    ap.add_argument("--no-plots", action="store_true", help="leave out the waveform plots")
    ap.add_argument("--verbose", action="store_true", help="print each finished group of parts")
    ap.add_argument("--report", metavar="DIR", help="also write the report here (default: a temporary folder)")
    args = ap.parse_args(argv)

    board = generate(args.parts)
    profile = load_profile()
    # with --limit the whole board is simulated, but only its first parts are surveyed
    names = [p.name for p in board.parts[: args.limit]] if args.limit else None
    print(f"board: {board.name}, {len(board.nets)} nets; engine analytic; depth {args.depth}; "
          f"jobs {args.jobs}" + (f"; first {args.limit} parts only" if args.limit else "")
          + ("; no advice" if args.no_advice else "") + ("; no plots" if args.no_plots else ""),
          flush=True)

    tracemalloc.start()
    started, cpu0 = time.perf_counter(), _cpu()
    settings = Settings(depth=args.depth, jobs=args.jobs, advice=not args.no_advice,
                        plots=not args.no_plots)

    def progress(done: int, total: int, label: str) -> None:
        print(f"  {done}/{total} done after {time.perf_counter() - started:.0f} s ({label[:40]})", flush=True)

    result = survey(board, profile, settings, progress if args.verbose else None, parts=names)
    t_survey, cpu_survey = time.perf_counter() - started, _cpu() - cpu0
    heap_survey = tracemalloc.get_traced_memory()[1]

    started = time.perf_counter()
    folder = args.report or tempfile.mkdtemp(prefix="bench-survey-")
    files = write_report(folder, result.to_dict(), result.traces, jobs=args.jobs)
    t_report = time.perf_counter() - started
    heap_peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    own, children = _peak_rss_mib()

    n = len(result.records)
    total = t_survey + t_report
    scale = len(board.parts) / n if n else 1.0
    counts = ", ".join(f"{v} {k}" for k, v in result.counts().items() if v)
    print(f"parts surveyed: {n} ({counts}); coverage {result.coverage()['share']:.3f}")
    print(f"survey: {t_survey:.1f} s wall, {cpu_survey:.1f} s CPU (all processes), "
          f"{t_survey / max(n, 1) * 1000:.0f} ms per part")
    print(f"report: {t_report:.1f} s ({', '.join(f'{k} {p.stat().st_size / 1e6:.1f} MB' for k, p in files.items())})")
    print(f"peak memory: main process {own:.0f} MiB RSS (Python heap {heap_peak / 2**20:.0f} MiB, "
          f"{heap_survey / 2**20:.0f} MiB during the survey), largest worker {children:.0f} MiB RSS")
    estimate = total * scale
    print(f"total {total:.1f} s" + (f"; all {len(board.parts)} parts at this rate: about {estimate:.0f} s"
                                   if scale > 1 else ""))
    ok_time = estimate < GOAL_SECONDS
    ok_mem = max(own, children) * 2**20 < GOAL_BYTES
    print(f"goal under {GOAL_SECONDS:.0f} s: {'met' if ok_time else 'NOT met'}; "
          f"goal under 1 GiB per process: {'met' if ok_mem else 'NOT met'}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
