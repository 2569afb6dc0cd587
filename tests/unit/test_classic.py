"""The classic best-choice problem: published values, brute force, simulation.

Published values
----------------
Gilbert, J. P. & Mosteller, F. (1966). Recognizing the maximum of a sequence.
J. Amer. Statist. Assoc. 61, 35-73, Table 2 (optimal number to pass and the
probability of success for small n).  Ferguson, T. S. (1989). Who solved the
secretary problem? Statistical Science 4, 282-296 (the 1/e limit and the
cutoff r ~ n/e).  Table values below are from memory and are confirmed here
independently by exact rational arithmetic and brute-force enumeration.
"""

from __future__ import annotations

import itertools
import json
import math
import os
import subprocess
import sys
from fractions import Fraction
from pathlib import Path

import numpy as np
import pytest

from seqpick import ScenarioError, advise, solve
from seqpick.classic import evaluate_skip, optimal_skip, success_probability
from seqpick.harmonic import harmonic, tail

ROOT = Path(__file__).resolve().parents[2]

# (n, optimal number passed, P(success)) -- Gilbert & Mosteller 1966, Table 2
# (from memory; each is re-derived exactly in test_published_table_exact).
PUBLISHED = [
    (1, 0, 1.0), (2, 0, 0.5), (3, 1, 0.5), (4, 1, 0.4583), (5, 2, 0.4333),
    (6, 2, 0.4278), (7, 2, 0.4143), (8, 3, 0.4098), (9, 3, 0.4060), (10, 3, 0.3987),
    (20, 7, 0.3842), (50, 18, 0.3743), (100, 37, 0.3710), (1000, 368, 0.3682),
]


def exact_success(n: int, r: int) -> Fraction:
    if r == 0:
        return Fraction(1, n)
    return Fraction(r, n) * sum((Fraction(1, k) for k in range(r, n)), Fraction(0))


@pytest.mark.parametrize("n,r,p", PUBLISHED)
def test_published_table(n, r, p):
    res = solve({"version": 1, "pool": {"size": n}})
    assert res.policy.skip == r
    assert res.success_probability == pytest.approx(p, abs=5e-5)
    assert res.policy.thresholds == [0] * r + [1] * (n - r)


@pytest.mark.parametrize("n", [1, 2, 3, 4, 5, 7, 10, 25, 60])
def test_published_table_exact(n):
    """The optimal skip maximises the exact rational success chance."""
    values = [exact_success(n, r) for r in range(n)]
    best = max(values)
    smallest = values.index(best)
    r, tie = optimal_skip(n)
    assert r == smallest
    assert tie == (values.count(best) > 1)
    assert success_probability(n, r) == pytest.approx(float(best), rel=1e-14)


def test_tie_is_reported():
    res = solve({"pool": {"size": 2}})
    assert res.policy.skip == 0
    assert any("same chance" in n for n in res.notes)


def test_limit_one_over_e():
    # Ferguson 1989: P -> 1/e and r/n -> 1/e.
    res = solve({"pool": {"size": 1_000_000}})
    assert res.success_probability == pytest.approx(1 / math.e, abs=1e-6)
    assert res.policy.skip / 1_000_000 == pytest.approx(1 / math.e, abs=1e-6)
    assert len(res.policy.thresholds) == 1_000_000
    assert [g.threshold for g in res.policy.groups] == [0, 1]


def test_optimal_skip_matches_scan_for_every_n_up_to_3000():
    # Independent scan: accumulate the harmonic tail from the top (float sums of
    # small terms first, error far below the gaps that decide the cutoff).
    for n in range(3, 3001):
        s = 0.0
        r = n - 1
        while True:
            s += 1.0 / r
            if s > 1.0:
                break
            r -= 1
        # tail(r) > 1 first happens at this r: that is r* (largest r with tail > 1)
        assert optimal_skip(n)[0] == r, n


@pytest.mark.parametrize("n", [12_345, 99_999, 500_001, 1_000_000])
def test_large_n_against_fsum(n):
    r, _ = optimal_skip(n)
    exact_tail = math.fsum(1.0 / k for k in range(r, n))
    assert exact_tail > 1.0 >= math.fsum(1.0 / k for k in range(r + 1, n))
    assert success_probability(n, r) == pytest.approx(r / n * exact_tail, rel=1e-13)


def test_harmonic_against_fractions():
    for n in [0, 1, 2, 17, 256, 257, 300, 1000]:
        exact = float(sum((Fraction(1, k) for k in range(1, n + 1)), Fraction(0)))
        assert harmonic(n) == pytest.approx(exact, rel=1e-15, abs=0)
    for a, b in [(257, 400), (300, 2000), (1000, 1001), (5, 260), (258, 258)]:
        exact = float(sum((Fraction(1, k) for k in range(a, b + 1)), Fraction(0)))
        assert tail(a, b) == pytest.approx(exact, rel=2e-15)


# ---------------------------------------------------------------- brute force

def relative_ranks(perm):
    out = []
    for i, v in enumerate(perm):
        out.append(1 + sum(1 for u in perm[:i] if u < v))
    return out


def brute_skip(n, r, must_hire=False):
    """Enumerate all n! orders (rank 1 = best) for the skip-r rule."""
    best = none = forced = 0
    interviews = 0
    ranks = [0] * (n + 1)
    total = 0
    for perm in itertools.permutations(range(1, n + 1)):
        total += 1
        rel = relative_ranks(perm)
        hired = None
        for i in range(r, n):
            if rel[i] == 1:
                hired = i
                break
        if hired is None:
            if must_hire:
                forced += 1
                ranks[perm[-1]] += 1
            else:
                none += 1
            interviews += n
            continue
        interviews += hired + 1
        ranks[perm[hired]] += 1
        if perm[hired] == 1:
            best += 1
    return (Fraction(best, total), Fraction(none, total), Fraction(forced, total),
            Fraction(interviews, total), [Fraction(c, total) for c in ranks[1:]])


@pytest.mark.parametrize("n", range(1, 9))
@pytest.mark.parametrize("must_hire", [False, True])
def test_brute_force_every_skip(n, must_hire):
    for r in range(n):
        best, none, forced, interviews, ranks = brute_skip(n, r, must_hire)
        res = evaluate_skip(n, r, must_hire=must_hire)
        assert res.success_probability == pytest.approx(float(best), abs=1e-13)
        assert res.outcome.none == pytest.approx(float(none), abs=1e-13)
        assert res.outcome.forced_last == pytest.approx(float(forced), abs=1e-13)
        assert res.expected_interviews == pytest.approx(float(interviews), abs=1e-12)
        for a in range(n):
            assert res.rank_distribution.probabilities[a] == pytest.approx(
                float(ranks[a]), abs=1e-13)
        o = res.outcome
        assert o.best + o.other + o.none + o.forced_last == pytest.approx(1, abs=1e-12)
        hire = 1 - float(none)
        if hire > 0:
            mean = sum(float(p) * (a + 1) for a, p in enumerate(ranks)) / hire
            assert res.expected_rank == pytest.approx(mean, rel=1e-12)
        for m in (1, 2, 3, 5):
            assert res.top[str(m)] == pytest.approx(float(sum(ranks[:m])), abs=1e-13)


def brute_optimal(n):
    """Best value over every relative-rank policy, by backward induction over
    the tree of observed histories (each history = a prefix of relative ranks),
    computed from the set of orders consistent with it."""
    perms = list(itertools.permutations(range(1, n + 1)))
    rels = [tuple(relative_ranks(p)) for p in perms]

    def value(prefix, members):
        i = len(prefix)
        stop = 0.0
        if i > 0:
            stop = sum(1 for m in members if perms[m][i - 1] == 1) / len(members)
        if i == n:
            return stop
        groups = {}
        for m in members:
            groups.setdefault(rels[m][i], []).append(m)
        cont = sum(len(g) / len(members) * value(prefix + (j,), g) for j, g in groups.items())
        return max(stop, cont)

    return value((), list(range(len(perms))))


@pytest.mark.parametrize("n", range(1, 8))
def test_brute_force_optimal_over_all_policies(n):
    assert solve({"pool": {"size": n}}).success_probability == pytest.approx(
        brute_optimal(n), abs=1e-12)


# ---------------------------------------------------------------- simulation

@pytest.mark.parametrize("n,trials", [(50, 200_000), (400, 60_000)])
def test_numpy_simulation(n, trials):
    """Simulate the returned rule; agree within 4 standard errors."""
    res = solve({"pool": {"size": n}})
    r = res.policy.skip
    rng = np.random.default_rng(20261201)
    u = rng.random((trials, n))
    best_first = u[:, :r].max(axis=1)
    later = u[:, r:] > best_first[:, None]
    has = later.any(axis=1)
    first = np.where(has, later.argmax(axis=1) + r, n - 1)
    won = has & (u[np.arange(trials), first] == u.max(axis=1))
    interviews = np.where(has, first + 1, n)
    for est, exact in ((won.mean(), res.success_probability),
                       ((~has).mean(), res.p_no_hire)):
        se = math.sqrt(exact * (1 - exact) / trials)
        assert abs(est - exact) < 4 * se
    se_i = interviews.std() / math.sqrt(trials)
    assert abs(interviews.mean() - res.expected_interviews) < 4 * se_i


# ---------------------------------------------------------------- limits & curve

def test_curve_and_limit():
    res = solve({"pool": {"size": 100}})
    c = res.curve
    assert c.complete and c.skips == list(range(100))
    assert max(c.success) == res.success_probability
    assert c.success.index(max(c.success)) == 37
    # limit curve -x ln x
    assert c.limit[37] == pytest.approx(-0.37 * math.log(0.37), rel=1e-12)
    big = solve({"pool": {"size": 50_000}}).curve
    assert not big.complete and 900 <= len(big.skips) <= 1001
    assert solve({"pool": {"size": 50_000}}).policy.skip in big.skips
    for r, p, lim in zip(big.skips, big.success, big.limit):
        assert abs(p - lim) < 1e-3


def test_skip_share_leaves_last_candidate_with_chance_x():
    # Common practice: skipping a share x of the pool, the best is among those
    # skipped with chance x, so with must_hire the last candidate is taken with
    # chance x (exactly floor(xN)/N).
    res = solve({"pool": {"size": 1000}, "must_hire": True,
                 "compare": [{"skip_share": 0.37}, {"skip_share": 0.5}, {"skip": 0}]})
    a, b, c = res.compare
    assert a.outcome.forced_last == pytest.approx(0.37, abs=1e-15)
    assert b.outcome.forced_last == pytest.approx(0.5, abs=1e-15)
    assert c.outcome.forced_last == 0 and c.success_probability == pytest.approx(0.001)
    assert a.rule == {"skip_share": 0.37}
    assert res.success_probability >= max(x.success_probability for x in res.compare)


# ---------------------------------------------------------------- advice

@pytest.mark.parametrize("n", [1, 5, 40, 100])
def test_advice_matches_plan_at_every_stage(n):
    res = solve({"pool": {"size": n}})
    for i in range(1, n + 1):
        for j in (1, 2) if i > 1 else (1,):
            seen = [{"relative_rank": 1}] * (i - 1) + [{"relative_rank": j}]
            a = advise({"pool": {"size": n}}, seen)
            plan = "offer" if (j <= res.policy.thresholds[i - 1]) else "pass"
            assert a.decision == plan, (n, i, j)
            assert a.plan_decision == plan


# ---------------------------------------------------------------- CLI & errors

def run_cli(args, stdin):
    env = dict(os.environ, PYTHONPATH=str(ROOT / "pylib"))
    return subprocess.run([sys.executable, "-m", "seqpick", *args], input=stdin,
                          capture_output=True, text=True, env=env, cwd=ROOT)


def test_cli_solve_from_checkout():
    p = run_cli(["solve"], json.dumps({"version": 1, "pool": {"size": 100},
                                       "compare": [{"skip": 30}, {"skip_share": 0.37}]}))
    assert p.returncode == 0, p.stderr
    out = json.loads(p.stdout)
    assert out["policy"]["skip"] == 37
    assert round(out["success_probability"], 4) == 0.3710
    assert [c["rule"] for c in out["compare"]] == [{"skip": 30}, {"skip_share": 0.37}]
    assert set(out["outcome"]) == {"best", "other", "none", "forced_last"}
    assert set(out["top"]) == {"1", "2", "3", "5", "10", "10%", "25%", "50%"}


@pytest.mark.parametrize("payload,field", [
    ({"pool": {"size": 0}}, "pool.size"),
    ({"pool": {"size": 2_000_000}}, "pool.size"),
    ({"pool": {"size": 10}, "compare": [{"skip": 10}]}, "compare.0.skip"),
    ({"pool": {"size": 10}, "compare": [{"skip_share": 1.5}]}, "compare.0.skip_share"),
    ({"pool": {"size": 10}, "colour": 1}, "colour"),
    ({"version": 2, "pool": {"size": 10}}, "version"),
    ({"pool": {"size": "ten"}}, "pool.size"),
    ({"pool": {}}, "pool"),
    ([], "scenario"),
])
def test_cli_invalid_input(payload, field):
    p = run_cli(["solve"], json.dumps(payload))
    assert p.returncode == 2
    assert "Traceback" not in p.stderr + p.stdout
    err = json.loads(p.stdout)["error"]
    assert err["field"] == field
    assert err["message"]


def test_cli_not_json_and_missing_file():
    p = run_cli(["solve"], "{nope")
    assert p.returncode == 2 and json.loads(p.stdout)["error"]["field"] == "input"
    p = run_cli(["solve", "/nonexistent/scenario.json"], "")
    assert p.returncode == 2 and json.loads(p.stdout)["error"]["field"] == "file"


def test_error_names_range():
    with pytest.raises(ScenarioError) as e:
        solve({"pool": {"size": -3}})
    assert e.value.field == "pool.size"
    assert "1 to 1,000,000" in e.value.message and "-3" in e.value.message
