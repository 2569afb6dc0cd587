#!/usr/bin/env python3
"""Benchmark: CPython solve times of the window and odds solvers.

    python3 build_scripts/bench_window_odds.py [--repeat 3] [--pylib DIR] [--quick]

Window pools: expected arrivals L*T = 1e2, 1e3, 1e4 and 9e4 (the largest the
scenario allows), timed cold (threshold cache cleared) and warm, plus one
live-advice call.  Odds pools: N = 1e2 .. 1e5 stages with p_k = 1/k, the
standard odds algorithm and the backward induction used with declines.
Every solve includes ``to_dict()``.  Times are CPU seconds of this process
(best of --repeat runs), which a busy shared machine disturbs much less than
wall time; the first line times a fixed pure-Python loop (1e6 steps) as a
yardstick for the machine's speed at the moment.  The module import (and its
compilation when no bytecode cache is written) is not included.  ``--pylib``
times another copy of the engine (for before/after tables).  Speed is
measured here, never asserted in tests.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path


def _best(fn, repeat: int, before=None) -> float:
    times = []
    for _ in range(repeat):
        if before:
            before()
        t0 = time.process_time()
        fn()
        times.append(time.process_time() - t0)
    return min(times)


def _row(label: str, size: float, secs: float, prev: float | None) -> str:
    ratio = f"{secs / prev:6.2f}x" if prev else "      -"
    return f"{label:<28} {size:>10,.0f} {secs * 1e3:10.2f} ms {ratio}"


def _calibration() -> float:
    t0 = time.process_time()
    acc = 0
    for i in range(1_000_000):
        acc += i * i
    return time.process_time() - t0


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--pylib", default=str(Path(__file__).resolve().parents[1] / "pylib"),
                    help="directory holding the seqpick package to time")
    ap.add_argument("--quick", action="store_true", help="window only, no 9e4 cold run")
    args = ap.parse_args()
    sys.path.insert(0, args.pylib)
    from seqpick import advise, solve            # noqa: E402
    from seqpick import odds, window             # noqa: E402,F401

    def clear() -> None:
        if hasattr(window, "_clear_caches"):
            window._clear_caches()
        else:                                    # the engine before the chain of moves
            window._XCACHE.clear()

    print(f"engine: {args.pylib}")
    print(f"yardstick (1e6-step Python loop): {_calibration() * 1e3:.0f} ms CPU")
    print(f"{'case':<28} {'size':>10} {'time':>13} {'growth':>7}")
    sizes = (1e2, 1e3, 1e4, 9e4)
    for label, cold in (("window solve (cold cache)", True), ("window solve (warm cache)", False)):
        prev = None
        for lam in sizes:
            if cold and args.quick and lam > 1e4:
                continue
            sc = {"pool": {"window": 10.0, "arrivals_per_unit": lam / 10.0}}
            if not cold:
                solve(sc)
            secs = _best(lambda: solve(sc).to_dict(), args.repeat, clear if cold else None)
            print(_row(label, lam, secs, prev), flush=True)
            prev = secs
    prev = None
    for lam in sizes:
        sc = {"pool": {"window": 10.0, "arrivals_per_unit": lam / 10.0}}
        seen = [{"relative_rank": 1, "time": 3.0}]
        advise(sc, seen)
        secs = _best(lambda: advise(sc, seen).to_dict(), args.repeat)
        print(_row("window advise (warm)", lam, secs, prev), flush=True)
        prev = secs
    if args.quick:
        return 0
    for label, extra in (("odds solve (odds algorithm)", {}),
                         ("odds solve (declines, DP)", {"accept_probability": 0.7})):
        prev = None
        for n in (100, 1_000, 10_000, 100_000):
            sc = {"pool": {"chances": [1.0 / k for k in range(1, n + 1)]}, **extra}
            secs = _best(lambda: solve(sc).to_dict(), args.repeat)
            print(_row(label, n, secs, prev), flush=True)
            prev = secs
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
