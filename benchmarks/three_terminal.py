"""Three-probe identification: CPU time and steps per run, both engines.

Prints, for the relay driver's Q1 (NPN) and M1 (N-MOSFET), alone and in
circuit, the reading, the number of steps, the tester's own time for the
run and the CPU time of the simulation (time.process_time, robust on a
shared machine). Usage::

    .venv/bin/python benchmarks/three_terminal.py [--engine analytic|ngspice|both]
"""

from __future__ import annotations

import argparse
import time

from incircuit.chips import apply_pin_roles
from incircuit.demo_boards import resolve_board
from incircuit.engines.ngspice import available
from incircuit.errors import EngineError
from incircuit.netlist import load
from incircuit.predict import identify


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--engine", choices=("analytic", "ngspice", "both"), default="both")
    args = parser.parse_args()
    engines = ["analytic", "ngspice"] if args.engine == "both" else [args.engine]
    if "ngspice" in engines and available() is not None:
        print(f"ngspice not available ({available()}): analytic only")
        engines = ["analytic"]
    path, pins = resolve_board("relay-driver")
    board = apply_pin_roles(load(path), pins)
    print(f"{'part':<5} {'where':<11} {'engine':<9} {'reading':<34} {'steps':>5} {'tester s':>9} {'CPU s':>7}")
    for part in ("Q1", "M1"):
        nets = board.part(part).pins[:3]
        for where, b in (("alone", board.only(part)), ("in circuit", board)):
            for engine in engines:
                start = time.process_time()
                try:
                    run = identify(b, nets, engine=engine, trace_points=0)
                except EngineError as error:
                    print(f"{part:<5} {where:<11} {engine:<9} engine error: {error.message}")
                    continue
                cpu = time.process_time() - start
                r = run.reading
                value = "" if r.value is None else (f" {r.value:.0f}" if r.unit == "1" else f" {r.value:.4g} {r.unit}")
                text = (r.kind + value)[:34]
                print(f"{part:<5} {where:<11} {engine:<9} {text:<34} {len(run.steps):>5} "
                      f"{run.duration:>9.3f} {cpu:>7.2f}")


if __name__ == "__main__":
    main()
