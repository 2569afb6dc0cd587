"""Benchmark: CPython solve times of the full-information engine.

Prints, per goal and score distribution, the time of ``solve`` at
N = 10^2, 10^3, 10^4, 10^5 and the growth ratio between consecutive sizes
(10x the pool should cost about 10x for the O(N) and O(N x 19) parts; the
chance of the best for goal score is O(N^2) but only computed for
N <= seqpick.fullinfo.SCORE_BEST_MAX).  Each time is the best of ``--repeat``
runs.  Speed is measured here, never asserted in tests.

Usage: python3 build_scripts/bench_fullinfo.py [--max 100000] [--repeat 1]
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pylib"))

from seqpick import solve  # noqa: E402

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


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--max", type=int, default=100_000)
    ap.add_argument("--repeat", type=int, default=1)
    args = ap.parse_args()
    sizes = [n for n in (100, 1_000, 10_000, 100_000) if n <= args.max]
    print(f"Python {sys.version.split()[0]}; compare rules: skip 37%, score_at_least 80")
    print(f"{'case':40s}" + "".join(f"{n:>12,}" for n in sizes) + "   growth")
    for name, extra in CASES:
        times = []
        for n in sizes:
            s = {"pool": {"size": n}, "compare": [{"skip_share": 0.37},
                                                  {"score_at_least": 80}], **extra}
            best = float("inf")
            for _ in range(args.repeat):
                t0 = time.perf_counter()
                solve(s)
                best = min(best, time.perf_counter() - t0)
            times.append(best)
        growth = " ".join(f"x{b / a:.1f}" for a, b in zip(times, times[1:]))
        print(f"{name:40s}" + "".join(f"{t:11.3f}s" for t in times) + f"   {growth}")


if __name__ == "__main__":
    main()
