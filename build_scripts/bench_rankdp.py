#!/usr/bin/env python3
"""Benchmark the relative-rank engine: solve times at N = 10^2 .. 10^5.

    python3 build_scripts/bench_rankdp.py [--sizes 100,1000,10000,100000] [--repeat 1]

For every variant the full ``solve`` (optimal rule, its exact evaluation,
rank distribution / top table within their work limits, curve) is timed in
CPU seconds of this process (``time.process_time``: robust when other jobs
share the machine) and, for reference, wall-clock seconds; the cache of DP
tables is cleared before each run.  The last columns are the growth ratios
t(10N) / t(N).  The full solve includes the exact rank distribution and
top-m table while they fit their work limits (so its growth jumps where they
switch off); the second table times only the DP and the exact evaluation of
the optimal rule, whose growth is about 10 (O(N) work).
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pylib"))

from seqpick import rankdp  # noqa: E402
from seqpick.scenario import parse_scenario  # noqa: E402


def variants(n: int) -> dict[str, dict]:
    w = [1 + (i * 7919) % 5 for i in range(n)]
    return {
        "best, declines p=0.6": {"pool": {"size": n}, "accept_probability": 0.6},
        "best, cost 0.001": {"pool": {"size": n}, "cost_per_candidate": 0.001},
        "best, size 1..N": {"pool": {"size_min": 1, "size_max": n}},
        "best, Poisson 0.9N": {"pool": {"size_mean": 0.9 * n}},
        "best, weights": {"pool": {"size_weights": w}},
        "best, 3 openings": {"pool": {"size": n}, "openings": 3},
        "top k=2": {"pool": {"size": n}, "goal": {"type": "top", "k": 2}},
        "top k=25": {"pool": {"size": n}, "goal": {"type": "top", "k": 25}},
        "top k=5, size 1..N": {"pool": {"size_min": 1, "size_max": n},
                               "goal": {"type": "top", "k": 5}},
        "rank": {"pool": {"size": n}, "goal": {"type": "rank"}},
        "rank, size 1..N": {"pool": {"size_min": 1, "size_max": n},
                            "goal": {"type": "rank"}},
        "rank, declines, 3 rules": {"pool": {"size": n}, "goal": {"type": "rank"},
                                    "accept_probability": 0.7,
                                    "compare": [{"skip": n // 4}, {"skip_share": 0.3},
                                                {"skip_share": 0.5}]},
    }


def timed(sc: dict, repeat: int) -> tuple[float, float, str]:
    best_cpu = best_wall = float("inf")
    extras = ""
    for _ in range(repeat):
        rankdp._plan_for_key.cache_clear()
        s = parse_scenario(sc)
        c0, w0 = time.process_time(), time.perf_counter()
        res = rankdp.solve_rankdp(s)
        best_cpu = min(best_cpu, time.process_time() - c0)
        best_wall = min(best_wall, time.perf_counter() - w0)
        extras = ("D" if res.rank_distribution else "-") + ("T" if res.top else "-") + \
                 ("C" if res.curve else "-")
    return best_cpu, best_wall, extras


def timed_core(sc: dict, repeat: int) -> float:
    """CPU seconds of the DP plus the exact evaluation of the optimal rule only."""
    best = float("inf")
    for _ in range(repeat):
        rankdp._plan_for_key.cache_clear()
        s = parse_scenario(sc)
        c0 = time.process_time()
        plan = rankdp._plan(s)
        rankdp._core(plan.md, rankdp._optimal_rule(plan.md, plan, ""))
        best = min(best, time.process_time() - c0)
    return best


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", default="100,1000,10000,100000")
    ap.add_argument("--repeat", type=int, default=1)
    args = ap.parse_args()
    sizes = [int(x) for x in args.sizes.split(",")]
    names = list(variants(sizes[0]))
    head = "".join(f"{'N=' + format(n, ','):>14}" for n in sizes)
    ratios = "".join(f"{'x' + str(b // a):>8}" for a, b in zip(sizes, sizes[1:]))
    print("CPU seconds per solve (wall seconds in brackets); D/T/C = rank distribution, "
          "top table, curve present")
    print(f"{'variant':26}{head}   growth{ratios}")
    for name in names:
        row, cpu = [], []
        for n in sizes:
            c, w, ex = timed(variants(n)[name], args.repeat)
            cpu.append(c)
            row.append(f"{c:6.3f} ({w:5.2f}){ex}")
        growth = "".join(f"{(b / a if a > 0 else float('nan')):8.1f}"
                         for a, b in zip(cpu, cpu[1:]))
        print(f"{name:26}" + "".join(f"{x:>14}" for x in row) + "         " + growth,
              flush=True)
    print()
    print("DP + exact evaluation of the optimal rule only (CPU seconds; O(N) per the "
          "docstrings)")
    print(f"{'variant':26}" + "".join(f"{'N=' + format(n, ','):>10}" for n in sizes)
          + f"   growth{ratios}")
    for name in names:
        cpu = [timed_core(variants(n)[name], args.repeat) for n in sizes]
        growth = "".join(f"{(b / a if a > 0 else float('nan')):8.1f}"
                         for a, b in zip(cpu, cpu[1:]))
        print(f"{name:26}" + "".join(f"{c:10.3f}" for c in cpu) + "   " + growth,
              flush=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
