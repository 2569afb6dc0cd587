#!/usr/bin/env python3
"""Benchmark the relative-rank engine: solve times at N = 10^2 .. 10^5.

    python3 build_scripts/bench_rankdp.py [--sizes 100,1000,10000,100000] [--repeat 3]
        [--only declines,rank] [--save after.json] [--before before.json]

For every variant ``solve(scenario).to_dict()`` (validation, the DP, the exact
evaluation of the optimal and the compared rules, rank distribution, top-m
table, curve, serialisation) is timed in CPU seconds of this process
(``time.process_time``: robust when other jobs share the machine; the best of
``--repeat`` runs) and, for reference, wall-clock seconds; the cache of DP
tables is cleared before each run.  The growth columns are t(10N) / t(N); the
"target" column is the CPython target at N = 10^4 (browser targets divided by
about 2.5 for Pyodide).  ``--save`` writes the CPU times as JSON and
``--before`` prints them beside the new ones (before -> after, speed-up).

The second table times only the DP and the exact evaluation of the optimal
rule (O(N) per the docstrings, growth about 10).
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pylib"))

from seqpick import rankdp, solve  # noqa: E402
from seqpick.scenario import parse_scenario  # noqa: E402

#: CPython targets (seconds) at N = 10^4: best / rank 20 ms, top k = 10 0.2 s.
TARGET_1E4 = {"top k=10": 0.2, "top k=25": None, "top k=2": 0.2,
              "top k=5, size 1..N": 0.2}


def variants(n: int) -> dict[str, dict]:
    w = [1 + (i * 7919) % 5 for i in range(n)]
    return {
        "best, declines p=0.7": {"pool": {"size": n}, "accept_probability": 0.7},
        "best, cost 0.0001": {"pool": {"size": n}, "cost_per_candidate": 0.0001},
        "best, 3 openings": {"pool": {"size": n}, "openings": 3},
        "best, size 1..N": {"pool": {"size_min": 1, "size_max": n}},
        "best, Poisson 0.8N": {"pool": {"size_mean": 0.8 * n}},
        "best, weights": {"pool": {"size_weights": w}},
        "best, all at once": {"pool": {"size_min": 1, "size_max": n},
                              "accept_probability": 0.7, "cost_per_candidate": 1e-5,
                              "openings": 3, "compare": [{"skip_share": 0.3}]},
        "top k=2": {"pool": {"size": n}, "goal": {"type": "top", "k": 2}},
        "top k=10": {"pool": {"size": n}, "goal": {"type": "top", "k": 10}},
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
        "rank, Poisson, cost": {"pool": {"size_mean": 0.8 * n}, "goal": {"type": "rank"},
                                "accept_probability": 0.7, "cost_per_candidate": 1e-4},
    }


def timed(sc: dict, repeat: int) -> tuple[float, float, str]:
    best_cpu = best_wall = float("inf")
    extras = ""
    for _ in range(repeat):
        rankdp._plan_cache_clear()
        c0, w0 = time.process_time(), time.perf_counter()
        res = solve(sc)
        res.to_dict()
        best_cpu = min(best_cpu, time.process_time() - c0)
        best_wall = min(best_wall, time.perf_counter() - w0)
        extras = ("D" if res.rank_distribution else "-") + ("T" if res.top else "-") + \
                 ("C" if res.curve else "-")
    return best_cpu, best_wall, extras


def timed_core(sc: dict, repeat: int) -> float:
    """CPU seconds of the DP plus the exact evaluation of the optimal rule only."""
    best = float("inf")
    for _ in range(repeat):
        rankdp._plan_cache_clear()
        s = parse_scenario(sc)
        c0 = time.process_time()
        plan = rankdp._plan(s)
        rankdp._core(plan.md, rankdp._optimal_rule(plan.md, plan, ""))
        best = min(best, time.process_time() - c0)
    return best


def _target(name: str) -> float | None:
    return TARGET_1E4.get(name, 0.02)


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", default="100,1000,10000,100000")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--only", default="", help="comma-separated substrings of variant names")
    ap.add_argument("--save", default="", help="write CPU times (JSON) to this file")
    ap.add_argument("--before", default="", help="JSON from an earlier --save to compare")
    ap.add_argument("--no-core", action="store_true", help="skip the DP-only table")
    args = ap.parse_args()
    sizes = [int(x) for x in args.sizes.split(",")]
    names = list(variants(sizes[0]))
    if args.only:
        keys = [k.strip() for k in args.only.split(",")]
        names = [nm for nm in names if any(k in nm for k in keys)]
    before = json.loads(Path(args.before).read_text()) if args.before else {}
    saved: dict[str, dict[str, float]] = {}
    head = "".join(f"{'N=' + format(n, ','):>22}" for n in sizes)
    ratios = "".join(f"{'x' + str(b // a):>7}" for a, b in zip(sizes, sizes[1:]))
    print("solve(...).to_dict(): CPU seconds (best of {}), wall in brackets; D/T/C = rank "
          "distribution, top table, curve present".format(args.repeat))
    if before:
        print("with --before: 'old -> new' CPU seconds")
    print(f"{'variant':26}{head}  growth{ratios}  target@1e4")
    for name in names:
        row, cpu = [], []
        saved[name] = {}
        for n in sizes:
            c, w, ex = timed(variants(n)[name], args.repeat)
            cpu.append(c)
            saved[name][str(n)] = c
            old = before.get(name, {}).get(str(n))
            cell = (f"{old:.4f}->{c:.4f}{ex}" if old is not None else
                    f"{c:7.4f} ({w:6.3f}){ex}")
            row.append(cell)
        growth = "".join(f"{(b / a if a > 0 else float('nan')):7.1f}"
                         for a, b in zip(cpu, cpu[1:]))
        tg = _target(name)
        meets = ""
        if tg is not None and 10_000 in sizes:
            meets = f"{tg:g} s " + ("ok" if cpu[sizes.index(10_000)] <= tg else "MISSED")
        print(f"{name:26}" + "".join(f"{x:>22}" for x in row) + "  " + growth + "  " + meets,
              flush=True)
    if args.save:
        Path(args.save).write_text(json.dumps(saved, indent=1))
    if args.no_core:
        return 0
    print()
    print("DP + exact evaluation of the optimal rule only (CPU seconds; O(N) per the "
          "docstrings)")
    print(f"{'variant':26}" + "".join(f"{'N=' + format(n, ','):>10}" for n in sizes)
          + f"  growth{ratios}")
    for name in names:
        cpu = [timed_core(variants(n)[name], args.repeat) for n in sizes]
        growth = "".join(f"{(b / a if a > 0 else float('nan')):7.1f}"
                         for a, b in zip(cpu, cpu[1:]))
        print(f"{name:26}" + "".join(f"{c:10.4f}" for c in cpu) + "  " + growth,
              flush=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
