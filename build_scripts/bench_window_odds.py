#!/usr/bin/env python3
"""Benchmark: CPython solve times of the window and odds solvers.

    python3 build_scripts/bench_window_odds.py [--repeat 3]

Window pools: expected arrivals L*T = 1e2, 1e3, 1e4 and 9e4 (the largest the
scenario allows), timed cold (threshold cache cleared) and warm, plus one
live-advice call.  Odds pools: N = 1e2 .. 1e5 stages with p_k = 1/k, the
standard odds algorithm and the backward induction used with declines.
Prints seconds (best of --repeat runs) and the growth ratio to the previous
size.  Speed is measured here, never asserted in tests.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pylib"))

from seqpick import advise, solve  # noqa: E402
from seqpick import window  # noqa: E402


def _best(fn, repeat: int, before=None) -> float:
    times = []
    for _ in range(repeat):
        if before:
            before()
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def _row(label: str, size: float, secs: float, prev: float | None) -> str:
    ratio = f"{secs / prev:6.2f}x" if prev else "      -"
    return f"{label:<28} {size:>10,.0f} {secs:10.4f} s {ratio}"


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()
    print(f"{'case':<28} {'size':>10} {'time':>12} {'growth':>7}")
    for label, cold in (("window solve (cold cache)", True), ("window solve (warm cache)", False)):
        prev = None
        for lam in (1e2, 1e3, 1e4, 9e4):
            sc = {"pool": {"window": 10.0, "arrivals_per_unit": lam / 10.0}}
            clear = window._XCACHE.clear if cold else None
            if not cold:
                solve(sc)
            secs = _best(lambda: solve(sc), args.repeat if lam < 9e4 else 1, clear)
            print(_row(label, lam, secs, prev))
            prev = secs
    prev = None
    for lam in (1e2, 1e3, 1e4, 9e4):
        sc = {"pool": {"window": 10.0, "arrivals_per_unit": lam / 10.0}}
        seen = [{"relative_rank": 1, "time": 3.0}]
        secs = _best(lambda: advise(sc, seen), args.repeat if lam < 9e4 else 1)
        print(_row("window advise (warm)", lam, secs, prev))
        prev = secs
    for label, extra in (("odds solve (odds algorithm)", {}),
                         ("odds solve (declines, DP)", {"accept_probability": 0.7})):
        prev = None
        for n in (100, 1_000, 10_000, 100_000):
            sc = {"pool": {"chances": [1.0 / k for k in range(1, n + 1)]}, **extra}
            secs = _best(lambda: solve(sc), args.repeat)
            print(_row(label, n, secs, prev))
            prev = secs
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
