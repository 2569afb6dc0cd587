"""Benchmark: CPython solve times of the full-information engine.

Prints, per goal and score distribution, the time of ``solve(...)`` followed
by ``to_dict()`` (what the browser worker does) at N = 10^2, 10^3, 10^4, 10^5
and the growth ratio between consecutive sizes (10x the pool should cost
about 10x: every part of a solve is O(N) or O(N x 19), and the chance of the
best for goal score is O(N) too).  Each time is the best of ``--repeat``
runs, in CPU time of the process by default (``--wall`` for wall-clock
time): on a shared, loaded machine the CPU time is the steadier measure.  A
yardstick line (one list pass over 10^5 floats) shows how fast the machine is
at the moment.  Speed is measured here, never asserted in tests.

``--check DIR`` also solves every case with the engine found in ``DIR`` (a
folder holding another copy of the ``seqpick`` package, e.g. a saved copy of
the previous version) and prints the largest difference between the two JSON
results (numbers below 1 compared absolutely, larger ones relatively; ``null``
must match ``null``), with its place; ``--ref-times`` times that engine too, for a before/after table.

Usage: python3 build_scripts/bench_fullinfo.py [--max 100000] [--repeat 1]
       [--check DIR [--ref-times]] [--wall]
"""

from __future__ import annotations

import argparse
import importlib
import math
import sys
import time
from pathlib import Path
from typing import Any, Callable

HERE = Path(__file__).resolve().parents[1] / "pylib"

CASES = [
    ("best, uniform", {"goal": {"type": "best"},
                       "scores": {"distribution": "uniform", "low": 0, "high": 100}}),
    ("best, normal, must_hire", {"goal": {"type": "best"}, "must_hire": True,
                                 "scores": {"distribution": "normal", "mean": 70, "sd": 10}}),
    ("best, normal, declines 0.7", {"goal": {"type": "best"}, "accept_probability": 0.7,
                                    "scores": {"distribution": "normal", "mean": 70,
                                               "sd": 10}}),
    ("score, normal", {"goal": {"type": "score"},
                       "scores": {"distribution": "normal", "mean": 70, "sd": 10}}),
    ("score, sample(200), 3 openings, cost", {
        "goal": {"type": "score"}, "openings": 3, "cost_per_candidate": 0.1,
        "scores": {"distribution": "sample",
                   "values": [50 + (37 * i) % 50 + 0.01 * i for i in range(200)]}}),
]


def _load(path: Path) -> Callable[[dict], Any]:
    """The ``solve`` of the seqpick package under ``path`` (a fresh import)."""
    for name in [m for m in sys.modules if m == "seqpick" or m.startswith("seqpick.")]:
        del sys.modules[name]
    sys.path.insert(0, str(path))
    try:
        mod = importlib.import_module("seqpick")
    finally:
        sys.path.remove(str(path))
    return mod.solve


def _scenario(n: int, extra: dict) -> dict:
    return {"pool": {"size": n}, "compare": [{"skip_share": 0.37}, {"score_at_least": 80}],
            **extra}


CLOCK = time.process_time


def _time(solve: Callable[[dict], Any], s: dict, repeat: int) -> tuple[float, Any]:
    best = math.inf
    out = None
    for _ in range(repeat):
        t0 = CLOCK()
        out = solve(s).to_dict()
        best = min(best, CLOCK() - t0)
    return best, out


def _calibrate() -> float:
    """Seconds for list(map(mul, x, x)) over 10^5 floats (best of 20): a yardstick
    of the machine's speed at the time (about 1.5 ms on an idle 2020s core)."""
    from operator import mul
    x = [1.0 + i for i in range(100_000)]
    best = math.inf
    for _ in range(20):
        t0 = CLOCK()
        list(map(mul, x, x))
        best = min(best, CLOCK() - t0)
    return best


def _diff(x: Any, y: Any, where: str = "") -> tuple[float, str]:
    """Largest difference between two JSON values, absolute below 1 and relative
    above (inf on a change of shape or of null)."""
    if isinstance(x, dict) and isinstance(y, dict):
        if x.keys() != y.keys():
            return math.inf, where + " (keys)"
        worst = (0.0, "")
        for k in x:
            d = _diff(x[k], y[k], f"{where}.{k}")
            if d[0] > worst[0]:
                worst = d
        return worst
    if isinstance(x, list) and isinstance(y, list):
        if len(x) != len(y):
            return math.inf, f"{where} (length {len(x)} vs {len(y)})"
        worst = (0.0, "")
        for i, (a, b) in enumerate(zip(x, y)):
            d = _diff(a, b, f"{where}[{i}]")
            if d[0] > worst[0]:
                worst = d
        return worst
    if isinstance(x, (int, float)) and isinstance(y, (int, float)) \
            and not isinstance(x, bool) and not isinstance(y, bool):
        return abs(x - y) / max(1.0, abs(x)), where
    if x == y:
        return 0.0, ""
    if isinstance(x, str) and isinstance(y, str):
        return 0.0, ""          # wording (e.g. the method line) may change
    return math.inf, f"{where} ({x!r} vs {y!r})"


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--max", type=int, default=100_000)
    ap.add_argument("--repeat", type=int, default=1)
    ap.add_argument("--check", type=Path, default=None,
                    help="folder with another seqpick package to compare results with")
    ap.add_argument("--ref-times", action="store_true",
                    help="with --check: print the other engine's times too")
    ap.add_argument("--wall", action="store_true",
                    help="wall-clock time instead of the process's CPU time")
    args = ap.parse_args()
    sizes = [n for n in (100, 1_000, 10_000, 100_000) if n <= args.max]
    if args.wall:
        global CLOCK
        CLOCK = time.perf_counter
    print(f"Python {sys.version.split()[0]}; solve + to_dict, best of {args.repeat}, "
          f"{'wall' if args.wall else 'CPU'} time; compare rules: skip 37%, "
          "score_at_least 80")
    print(f"yardstick: list(map(mul, x, x)) over 10^5 floats takes "
          f"{_calibrate() * 1e3:.2f} ms now")
    head = f"{'case':40s}" + "".join(f"{n:>12,}" for n in sizes) + "   growth"
    results: dict[tuple[str, int], Any] = {}
    rows = []
    solve = _load(HERE)
    for name, extra in CASES:
        times = []
        for n in sizes:
            t, out = _time(solve, _scenario(n, extra), args.repeat)
            times.append(t)
            results[(name, n)] = out
        rows.append((name, times))
    ref_rows = []
    worst: list[tuple[str, int, float, str]] = []
    if args.check is not None:
        ref = _load(args.check.resolve())
        for name, extra in CASES:
            times = []
            for n in sizes:
                t, out = _time(ref, _scenario(n, extra), args.repeat if args.ref_times else 1)
                times.append(t)
                d, where = _diff(results[(name, n)], out)
                worst.append((name, n, d, where))
            ref_rows.append((name, times))

    def table(title: str, rs: list) -> None:
        print(title)
        print(head)
        for name, times in rs:
            growth = " ".join(f"x{b / a:.1f}" for a, b in zip(times, times[1:]))
            print(f"{name:40s}" + "".join(f"{t:11.3f}s" for t in times) + f"   {growth}")

    if ref_rows and args.ref_times:
        table(f"before ({args.check}):", ref_rows)
        table("after (this tree):", rows)
    else:
        table("this tree:", rows)
    if worst:
        print(f"largest |difference| against {args.check}:")
        for name, n, d, where in worst:
            print(f"  {name:40s} N={n:<8,} {d:.3g}  {where}")


if __name__ == "__main__":
    main()
