"""The relative-rank engine (seqpick.rankdp): exactness and published values.

Independent checks
------------------
* brute force over every order and every history (tests/unit/brute_rank.py)
  for pools up to 8 candidates: optimal value, and the returned rule's
  outcome split, rank distribution, top-m table, interviews and hires;
* the classic closed form (r/N) sum_{k=r}^{N-1} 1/k (Lindley 1961;
  Gilbert & Mosteller 1966), computed here, not imported;
* published values and limits, source beside each;
* numpy simulation of the returned rule (4 standard errors, fixed seed);
* two exact evaluators of the same quantity cross-checked (rank push vs
  hypergeometric table; first-moment recursion vs full push);
* hypothesis properties.
"""

from __future__ import annotations

import json
import math
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from scipy import stats

from brute_rank import Brute, evaluate, skip_success
from seqpick import advise
from seqpick import rankdp as R
from seqpick.errors import ScenarioError
from seqpick.prior import pool_prior
from seqpick.scenario import parse_scenario


def _solve(sc):
    """Always the relative-rank engine (also for the classic case)."""
    return R.solve_rankdp(parse_scenario(sc))


def _objective(res, s):
    c = s.cost_per_candidate
    if s.goal.type == "rank":
        return res.expected_rank + c * res.expected_interviews
    return res.success_probability - c * res.expected_interviews


def _thresholds(res):
    if res.policy.thresholds_by_openings_left:
        return {int(a): b for a, b in res.policy.thresholds_by_openings_left.items()}
    return {1: res.policy.thresholds}


# --------------------------------------------------------------------------
# brute force
# --------------------------------------------------------------------------

UNCERTAIN = [{"size_min": 1, "size_max": 5}, {"size_min": 0, "size_max": 5},
             {"size_weights": [1, 0, 0, 1, 0, 2]}, {"size_weights": [3, 1, 0, 0, 1]}]
GOALS = [({"type": "best"}, (1, 2, 3)), ({"type": "top", "k": 2}, (1,)),
         ({"type": "top", "k": 3}, (1,)), ({"type": "rank"}, (1,))]
SETTINGS = ((1.0, 0.0), (0.6, 0.01), (1.0, 0.2))      # (accept_probability, cost)


def _case(pool, goal, p, c, m, must):
    return {"pool": pool, "goal": goal, "accept_probability": p, "cost_per_candidate": c,
            "openings": m, "must_hire": must}


def _cases():
    out = []
    for goal, opens in GOALS:
        for m in opens:
            for p, c in SETTINGS:
                for must in (False, True):
                    out.append(_case({"size": 5}, goal, p, c, m, must))
                for pool in UNCERTAIN:
                    if m <= 2:
                        out.append(_case(pool, goal, p, c, m, False))
            if goal["type"] == "rank":
                out.append(_case(UNCERTAIN[0], goal, 1.0, 0.0, 1, True))
    out += [_case({"size": 6}, {"type": "best"}, 0.6, 0.01, 2, True),
            _case({"size": 6}, {"type": "top", "k": 3}, 0.6, 0.0, 1, False),
            _case({"size": 6}, {"type": "rank"}, 1.0, 0.01, 1, True),
            _case({"size": 6}, {"type": "best"}, 0.6, 0.0, 1, False)]
    return out


def _brute_check(sc, tol=1e-12):
    s = parse_scenario(sc)
    res = R.solve_rankdp(s)
    prior = pool_prior(s.pool)
    kw = dict(k=s.goal.k or 1, p=s.accept_probability, m=s.openings,
              c=s.cost_per_candidate, must_hire=s.must_hire)
    brute = Brute(prior, s.goal.type, **kw)
    opt = brute.value()
    assert R._plan(s).value == pytest.approx(opt, abs=tol)          # the DP's value
    assert _objective(res, s) == pytest.approx(opt, abs=tol)        # the rule, evaluated
    ev = evaluate(prior, s.goal.type, _thresholds(res), **kw)
    assert ev.objective == pytest.approx(opt, abs=tol)
    o = res.outcome
    assert o.none == pytest.approx(ev.none, abs=tol)
    assert res.p_no_hire == pytest.approx(ev.none, abs=tol)
    assert o.forced_last == pytest.approx(ev.forced, abs=tol)
    assert o.best == pytest.approx(ev.best, abs=tol)
    assert o.other == pytest.approx(ev.other, abs=tol)
    assert res.expected_interviews == pytest.approx(ev.interviews, abs=tol)
    assert res.expected_hires == pytest.approx(ev.hires, abs=tol)
    assert res.expected_cost == pytest.approx(s.cost_per_candidate * ev.interviews, abs=tol)
    if s.goal.type != "rank":
        assert res.success_probability == pytest.approx(ev.success, abs=tol)
        if ev.none < 1:
            assert res.expected_rank == pytest.approx(ev.rank_sum / (1 - ev.none), abs=tol)
    dist = res.rank_distribution
    for a, v in enumerate(dist.probabilities, start=1):
        assert v == pytest.approx(ev.rank_dist.get(a, 0.0), abs=tol)
    assert dist.none == pytest.approx(ev.none, abs=tol)
    assert math.fsum(dist.probabilities) + dist.rest + dist.none == pytest.approx(1, abs=tol)
    assert set(res.top) == {"1", "2", "3", "5", "10", "10%", "25%", "50%"}
    for key, v in res.top.items():
        assert v == pytest.approx(ev.top.get(key, 0.0), abs=tol), key
    for c in res.compare:
        ev_c = evaluate(prior, s.goal.type, {lv: [0] * c.rule.get("skip", 0)
                                             + [1] * (len(prior) - 1 - c.rule.get("skip", 0))
                                             for lv in range(1, s.openings + 1)}, **kw)
        assert _objective(c, s) == pytest.approx(ev_c.objective, abs=tol)
    return res, opt


@pytest.mark.parametrize("sc", _cases(), ids=lambda sc: json.dumps(sc, separators=(",", ":")))
def test_brute_force(sc):
    sc = dict(sc, compare=[{"skip": 1}, {"skip": 2}])
    _brute_check(sc)


def test_brute_force_seven_candidates():
    _brute_check({"pool": {"size": 7}, "accept_probability": 0.6,
                  "cost_per_candidate": 0.01, "must_hire": True})


def test_non_interval_stopping_set():
    """Sizes 2 or 8, equally likely: offer at stage 2, pass at 3, offer again from 4.

    Brute force over all histories (8! orders) confirms it is optimal and that
    every skip-then-take rule (an interval of stages) does worse.
    """
    sc = {"pool": {"size_weights": [0, 1, 0, 0, 0, 0, 0, 1]}}
    res, opt = _brute_check(sc)
    assert res.policy.thresholds == [0, 1, 0, 1, 1, 1, 1, 1]
    assert res.policy.interval is False
    assert res.policy.skip is None
    assert "stage 2" in res.policy.words and "from stage 4 on" in res.policy.words
    prior = pool_prior(parse_scenario(sc).pool)
    for r in range(8):
        assert skip_success(prior, r) < opt - 1e-3


# --------------------------------------------------------------------------
# closed forms and published values
# --------------------------------------------------------------------------

def _classic(n: int, r: int) -> float:
    return 1.0 / n if r == 0 else float(Fraction(r, n) * sum(Fraction(1, k)
                                                              for k in range(r, n)))


@pytest.mark.parametrize("n", [1, 2, 3, 5, 10, 37, 100])
def test_classic_closed_form(n):
    """Lindley 1961; Gilbert & Mosteller 1966: skip r*, success (r/N) sum 1/k."""
    best = max(range(n), key=lambda r: (_classic(n, r), -r))   # ties -> smaller skip
    res = _solve({"pool": {"size": n}})
    assert res.policy.skip == best
    assert res.policy.thresholds == [0] * best + [1] * (n - best)
    assert res.success_probability == pytest.approx(_classic(n, best), abs=1e-14)
    if n == 100:
        assert best == 37
        assert res.success_probability == pytest.approx(0.371042, abs=1e-6)


def test_classic_large_n_closed_form():
    n = 5000
    res = _solve({"pool": {"size": n}})
    r = res.policy.skip
    tail = math.fsum(1.0 / k for k in range(r, n))
    assert tail > 1 >= tail - 1.0 / r                     # r is the optimal cutoff
    assert res.success_probability == pytest.approx(r / n * tail, abs=1e-12)


# Chow, Moriguchi, Robbins & Samuels (1964), Israel J. Math. 2, 81-90: minimal
# expected rank for small n (from memory: 1, 3/2, 5/3, 15/8, 41/20); each is also
# confirmed by brute force here.
@pytest.mark.parametrize("n,value", [(1, 1.0), (2, 1.5), (3, 5 / 3), (4, 15 / 8),
                                     (5, 41 / 20)])
def test_chow_small_n(n, value):
    res = _solve({"pool": {"size": n}, "goal": {"type": "rank"}})
    assert res.expected_rank == pytest.approx(value, abs=1e-13)
    assert Brute(pool_prior(parse_scenario({"pool": {"size": n}}).pool),
                 "rank", must_hire=True).value() == pytest.approx(value, abs=1e-13)


def _dp_value(sc):
    return R._plan(parse_scenario(sc)).value


def test_limits_large_n():
    """Published large-N limits; tolerances cover the O(1/N) approach."""
    # Chow et al. 1964: expected rank -> 3.8695 (N = 100,000 gives 3.8690)
    assert _dp_value({"pool": {"size": 100_000}, "goal": {"type": "rank"}}) == \
        pytest.approx(3.8695, abs=1e-3)
    # Gilbert & Mosteller 1966 / Gusein-Zade 1966: one of the best two -> 0.5736
    assert _dp_value({"pool": {"size": 10_000}, "goal": {"type": "top", "k": 2}}) == \
        pytest.approx(0.5736, abs=2e-4)
    # Gilbert & Mosteller 1966: two / three choices -> 0.5910 / 0.7321
    assert _dp_value({"pool": {"size": 10_000}, "openings": 2}) == \
        pytest.approx(0.5910, abs=2e-4)
    assert _dp_value({"pool": {"size": 10_000}, "openings": 3}) == \
        pytest.approx(0.7321, abs=2e-4)
    # Presman & Sonin 1972: pool size uniform on 1..M -> 2/e^2 = 0.27067
    assert _dp_value({"pool": {"size_min": 1, "size_max": 10_000}}) == \
        pytest.approx(2 * math.exp(-2), abs=2e-4)
    # Smith 1975: offers accepted with chance p -> p^(1/(1-p))
    for p in (0.3, 0.5, 0.8):
        assert _dp_value({"pool": {"size": 10_000}, "accept_probability": p}) == \
            pytest.approx(p ** (1 / (1 - p)), abs=3e-4)


def test_limits_listed():
    res = _solve({"pool": {"size": 50}, "accept_probability": 0.5})
    assert [lim.value for lim in res.limits] == pytest.approx([0.25, 0.25])
    assert "Smith 1975" in res.limits[0].source
    res = _solve({"pool": {"size": 50}, "goal": {"type": "rank"}})
    assert res.limits[0].value == 3.8695 and "Chow" in res.limits[0].source
    res = _solve({"pool": {"size_min": 1, "size_max": 50}})
    assert res.limits[0].value == pytest.approx(0.2706705664732254)
    assert _solve({"pool": {"size": 50}, "openings": 3}).limits[0].value == 0.7321


# --------------------------------------------------------------------------
# simulation
# --------------------------------------------------------------------------

def _simulate(sc, runs, seed):
    """Play the returned rule on random orders (true permutations, all runs at once).

    Each run draws its pool size n from the prior and a random order of n
    scores; relative ranks are counted from the scores (not assumed uniform).
    """
    s = parse_scenario(sc)
    res = R.solve_rankdp(s)
    thr = _thresholds(res)
    prior = np.array(pool_prior(s.pool))
    rng = np.random.default_rng(seed)
    M = len(prior) - 1
    n = rng.choice(M + 1, size=runs, p=prior / prior.sum())
    scores = rng.random((runs, M))
    k = s.goal.k or 1
    p, m = s.accept_probability, s.openings
    known = "size" in sc["pool"] and s.must_hire
    table = np.zeros((m + 1, M), dtype=int)          # table[l, i] = threshold
    for lv, row in thr.items():
        table[lv, :] = row
    left = np.full(runs, m)
    nhired = np.zeros(runs, dtype=int)
    best_score = np.full(runs, -1.0)          # best hired score so far
    seen = np.zeros(runs)
    for i in range(M):
        active = (i < n) & (left > 0)
        seen += active
        j = 1 + (scores[:, :i] > scores[:, i:i + 1]).sum(axis=1)
        t = table[left, i]
        forced = known & (i == n - 1) & (nhired == 0)
        offer = active & ((j <= t) | forced)
        accept = offer & (rng.random(runs) < p)
        left = left - accept
        nhired = nhired + accept
        best_score = np.where(accept & (scores[:, i] > best_score), scores[:, i], best_score)
    # absolute rank of the best hire among the run's own n candidates
    mask = np.arange(M)[None, :] < n[:, None]
    rank = np.where(nhired > 0,
                    1 + ((scores > best_score[:, None]) & mask).sum(axis=1), n + 1)
    goal = s.goal.type
    succ = (rank == 1) if goal == "best" else (rank <= k) & (nhired > 0)
    return res, succ.astype(float), rank.astype(float), seen


@pytest.mark.parametrize("sc,runs", [
    ({"pool": {"size": 50}, "accept_probability": 0.6}, 8000),
    ({"pool": {"size": 50}, "goal": {"type": "top", "k": 3}, "cost_per_candidate": 0.002},
     8000),
    ({"pool": {"size": 50}, "goal": {"type": "rank"}}, 8000),
    ({"pool": {"size_mean": 40}, "goal": {"type": "rank"}, "must_hire": False}, 8000),
    ({"pool": {"size_min": 10, "size_max": 60}, "openings": 2}, 8000),
    ({"pool": {"size": 50}, "must_hire": True, "accept_probability": 0.5}, 8000),
    ({"pool": {"size": 500}, "goal": {"type": "top", "k": 2}, "accept_probability": 0.7},
     4000),
])
def test_simulation(sc, runs):
    res, succ, rank, seen = _simulate(sc, runs, seed=20240611)
    se = lambda a: a.std(ddof=1) / math.sqrt(len(a))    # noqa: E731
    assert abs(seen.mean() - res.expected_interviews) < 4 * se(seen) + 1e-9
    if sc.get("goal", {}).get("type") == "rank":
        assert abs(rank.mean() - res.expected_rank) < 4 * se(rank)
    else:
        assert abs(succ.mean() - res.success_probability) < 4 * se(succ)


# --------------------------------------------------------------------------
# two exact evaluators agree
# --------------------------------------------------------------------------

def _rules(sc):
    s = parse_scenario(sc)
    plan = R._plan(s)
    md = plan.md
    rules = [R._optimal_rule(md, plan, "")] + R._compare(md, plan, s)
    return md, rules, [R._core(md, rl) for rl in rules]


@pytest.mark.parametrize("sc", [
    {"pool": {"size": 900}, "accept_probability": 0.6, "compare": [{"skip": 100}]},
    {"pool": {"size": 700}, "goal": {"type": "top", "k": 4}},
    {"pool": {"size": 400}, "goal": {"type": "rank"}, "cost_per_candidate": 0.01},
    {"pool": {"size": 300}, "goal": {"type": "rank"}, "must_hire": True,
     "accept_probability": 0.7},
    {"pool": {"size": 250}, "cost_per_candidate": 0.004, "accept_probability": 0.5},
    {"pool": {"size": 60}, "must_hire": True, "accept_probability": 0.6,
     "compare": [{"skip": 59}]},
])
def test_hypergeometric_tails_match_rank_push(sc):
    """P(rank <= K) from hypergeometric tails (_fixed_tails) against the full
    stage-by-stage push of the relative rank (_push), every K of the table."""
    md, rules, cores = _rules(sc)
    n = md.fixed_n
    keys = sorted({1, 2, 3, 5, 10, n // 10, n // 4, n // 2, n - 1})
    for rl, core in zip(rules, cores):
        tails = R._fixed_tails(md, rl, core, keys)
        fin, _b, none, _sh = R._push(md, rl, n)
        cum = np.cumsum(fin)
        for K in keys:
            assert tails[K] == pytest.approx(cum[K], abs=1e-12), K
        assert none == pytest.approx(core.none, abs=1e-13)


@pytest.mark.parametrize("sc", [
    {"pool": {"size": 300}, "accept_probability": 0.7, "compare": [{"skip": 0}, {"skip": 250}]},
    {"pool": {"size": 120}, "cost_per_candidate": 0.01, "accept_probability": 0.4},
    {"pool": {"size": 90}, "must_hire": True, "accept_probability": 0.5,
     "compare": [{"skip": 89}, {"skip": 3}]},
    {"pool": {"size": 50}, "goal": {"type": "top", "k": 3}, "compare": [{"skip": 20}]},
    {"pool": {"size": 2}}, {"pool": {"size": 1}, "accept_probability": 0.3},
])
def test_tau_recurrence_matches_rank_push(sc):
    """The first-order recurrence over ranks (_tau_head) against the push."""
    md, rules, cores = _rules(sc)
    n = md.fixed_n
    for rl, core in zip(rules, cores):
        if not all(t in (0, 1, R._ANYONE) for _s, _e, t in R._rule_runs(md, rl, 1)):
            continue
        head = R._tau_head(md, rl, core, n)
        fin, _b, _none, _sh = R._push(md, rl, n)
        assert head == pytest.approx(list(fin[1:n + 1]), abs=1e-13)


@pytest.mark.parametrize("sc", [
    {"pool": {"size": 200}, "goal": {"type": "rank"}, "accept_probability": 0.8},
    {"pool": {"size": 150}, "goal": {"type": "top", "k": 5}, "must_hire": True,
     "accept_probability": 0.6},
    {"pool": {"size_min": 3, "size_max": 120}, "accept_probability": 0.6,
     "compare": [{"skip": 10}]},
    {"pool": {"size_min": 0, "size_max": 90}, "goal": {"type": "rank"},
     "cost_per_candidate": 0.02},
    {"pool": {"size_mean": 60.0}, "goal": {"type": "top", "k": 2}},
    {"pool": {"size_weights": [0, 1, 0, 3, 0, 0, 2, 5, 1] * 8}, "cost_per_candidate": 0.01},
    {"pool": {"size": 120}, "openings": 3, "accept_probability": 0.7},
    {"pool": {"size_min": 20, "size_max": 100}, "openings": 2, "compare": [{"skip": 15}]},
    {"pool": {"size": 80}, "openings": 2, "must_hire": True, "accept_probability": 0.5},
])
def test_prefix_sum_ranks_match_rank_push(sc):
    """The prefix-sum method (_e_head, any pool, openings) against the push:
    ranks 1..R, and the share columns summed over the pool size."""
    md, rules, cores = _rules(sc)
    for rl, core in zip(rules, cores):
        if md.m > 1 and R._beyond_best(md, rl, core, range(1, md.m)):
            continue
        Rr = min(md.M, 160)
        cuts = R._share_cuts(md)
        head, shares = R._e_head(md, rl, core, Rr, cuts)
        fin, _b, _none, pshares = R._push(md, rl, md.M)
        assert head == pytest.approx(list(fin[1:Rr + 1]), abs=1e-13)
        if Rr == md.M and md.fixed_n is None:       # shares summed over the size n
            for x in shares:
                assert shares[x] == pytest.approx(pshares[x], abs=1e-12)


@pytest.mark.parametrize("t,K,i,N", [(1, 5, 3, 10), (3, 7, 9, 20), (2, 40, 30, 100),
                                     (5, 300, 40, 1000), (12, 500, 30, 1000),
                                     (30, 600, 50, 1000), (8, 20, 990, 1000),
                                     (200, 2500, 900, 10000), (400, 5000, 800, 10000),
                                     (2, 3, 9998, 10000), (60, 1000, 800, 10000)])
def test_hypergeometric_min_mean(t, K, i, N):
    """E[min(H, t)], H ~ Hypergeometric (scipy.stats), and the Loader pmf."""
    H = stats.hypergeom(N, K, i)
    hs = np.arange(0, min(K, i) + 1)
    exact = float(np.sum(np.minimum(hs, t) * H.pmf(hs)))
    assert R._min_mean(t, K, i, N) == pytest.approx(exact, abs=1e-12, rel=1e-12)
    for h in {max(0, i - (N - K)), min(t, K, i) - 1, int(i * K / N)}:
        if 0 <= h <= min(K, i) and H.pmf(h) > 1e-250:
            assert R._dhyper(h, K, i, N) == pytest.approx(H.pmf(h), rel=1e-12)


def test_sure_from_is_the_boundary():
    for t, K, N in [(1, 10, 100), (5, 1000, 10000), (40, 2500, 10000), (3, 99, 100),
                    (700, 5000, 10000), (9, 50_000, 100_000)]:
        i0 = R._sure_from(t, K, N)
        assert R._sure(t, K, i0, N)
        assert i0 == 1 or not R._sure(t, K, i0 - 1, N)
        assert all(R._sure(t, K, i, N) for i in range(i0, min(N, i0 + 500)))


@given(st.lists(st.integers(0, 6), min_size=1, max_size=60))
@settings(max_examples=60, deadline=None)
def test_runs_and_groups_rebuild_the_thresholds(raw):
    thr = [0] + [min(v, i) for i, v in enumerate(raw, start=1)]
    runs = R._runs_of(thr, len(raw))
    back = [0]
    for s_, e_, t in runs:
        assert s_ <= e_
        back += list(range(s_, e_ + 1)) if t == R._ANYONE else [t] * (e_ - s_ + 1)
        assert t != R._ANYONE or s_ >= 2
    assert back == thr
    assert all(a[1] + 1 == b[0] for a, b in zip(runs, runs[1:]))


@pytest.mark.parametrize("pool", [{"size": 30}, {"size_min": 4, "size_max": 30},
                                  {"size_mean": 9.0}])
def test_top_chance_recurrence_matches_binomial_formula(pool):
    """h_i(j) = sum_n post_i(n) sum_{a=j}^{k} C(a-1,j-1) C(n-a,i-j) / C(n,i)."""
    k = 4
    s = parse_scenario({"pool": pool, "goal": {"type": "top", "k": k}})
    plan = R._plan(s)
    prior = pool_prior(s.pool)
    for i in (1, 2, 5, 11, 17, 29):
        if i > len(prior) - 1:
            continue
        surv = math.fsum(prior[i:])
        h = R._h_at(plan, i)
        for j in range(1, min(i, k) + 1):
            exact = math.fsum(
                prior[n] / surv * math.fsum(math.comb(a - 1, j - 1) * math.comb(n - a, i - j)
                                            / math.comb(n, i)
                                            for a in range(j, min(k, n) + 1))
                for n in range(i, len(prior)) if prior[n] > 0)
            assert h[j - 1] == pytest.approx(exact, abs=1e-13), (i, j)


def test_moment_rank_matches_push_with_openings():
    s = parse_scenario({"pool": {"size_min": 20, "size_max": 120}, "openings": 3,
                        "accept_probability": 0.8})
    plan = R._plan(s)
    md = plan.md
    rl = R._optimal_rule(md, plan, "")
    fin, _b, none, _sh = R._push(md, rl, md.M)
    mean = math.fsum(r * v for r, v in enumerate(fin)) / (1 - none)
    assert R._moment_rank(md, rl) == pytest.approx(mean, abs=1e-11)


def test_curve_matches_skip_rules():
    for sc in ({"pool": {"size": 60}, "accept_probability": 0.6},
               {"pool": {"size_mean": 30}},
               {"pool": {"size_min": 5, "size_max": 40}, "goal": {"type": "top", "k": 3}}):
        skips = [0, 1, 7, 20]
        res = _solve(dict(sc, compare=[{"skip": r} for r in skips]))
        assert res.curve is not None and res.curve.complete
        for r, c in zip(skips, res.compare):
            assert res.curve.success[res.curve.skips.index(r)] == \
                pytest.approx(c.success_probability, abs=1e-13)
    res = _solve({"pool": {"size": 60}, "accept_probability": 0.5})
    x = 20 / 60
    assert res.curve.limit[20] == pytest.approx(0.5 * (x ** 0.5 - x) / 0.5)
    assert _solve({"pool": {"size": 60}, "goal": {"type": "rank"}}).curve is None


def test_large_pool_curve_and_fields():
    res = _solve({"pool": {"size": 100_000}, "accept_probability": 0.5,
                  "compare": [{"skip_share": 0.25}]})
    assert not res.curve.complete and len(res.curve.skips) <= 1001
    assert res.policy.skip in res.curve.skips
    for rr in [res] + list(res.compare):
        d = rr.rank_distribution                   # the rank recurrence: 200 ranks
        assert len(d.probabilities) == 200
        assert d.probabilities[0] == pytest.approx(rr.success_probability, abs=1e-13)
        assert math.fsum(d.probabilities) + d.rest + d.none == pytest.approx(1, abs=1e-12)
        assert rr.top["1"] == pytest.approx(rr.success_probability, abs=1e-13)
        assert rr.top["2"] == pytest.approx(math.fsum(d.probabilities[:2]), abs=1e-13)
    assert res.compare[0].rule == {"skip_share": 0.25}
    json.dumps(res.to_dict(), allow_nan=False)


@pytest.mark.parametrize("sc", [
    {"pool": {"size": 10_000}, "goal": {"type": "rank"}, "accept_probability": 0.7},
    {"pool": {"size": 10_000}, "goal": {"type": "top", "k": 10}},
    {"pool": {"size_min": 1, "size_max": 10_000}, "accept_probability": 0.7,
     "cost_per_candidate": 1e-5},
    {"pool": {"size_mean": 8000.0}, "goal": {"type": "rank"}},
    {"pool": {"size": 5000}, "openings": 3, "accept_probability": 0.8},
])
def test_large_pool_rank_head(sc):
    """Shortened rank lists at large sizes: exact head, rest + none fill to 1,
    the first rank equals the exact chance of hiring the best; a known size
    with one opening keeps ranks 1..10 and the whole top-m table."""
    s = parse_scenario(sc)
    res = R.solve_rankdp(s)
    d = res.rank_distribution
    assert d is not None and 1 <= len(d.probabilities) <= 200
    assert math.fsum(d.probabilities) + d.rest + d.none == pytest.approx(1, abs=1e-12)
    assert d.rest >= 0 and d.none == pytest.approx(res.p_no_hire, abs=1e-15)
    assert d.probabilities[0] == pytest.approx(res.outcome.best if s.goal.type != "top"
                                               else d.probabilities[0], abs=1e-12)
    if "size" in sc["pool"] and s.openings == 1:
        assert len(d.probabilities) >= 10 and res.top is not None
        for K in (1, 2, 3, 5, 10):
            assert res.top[str(K)] == pytest.approx(math.fsum(d.probabilities[:K]),
                                                    abs=1e-12)
    if len(d.probabilities) < 200:
        assert any("lists ranks 1.." in n for n in res.notes)


def test_rank_head_matches_push_when_shortened():
    """Where the list is cut for work (uncertain size, 1,500 candidates), the
    listed ranks are still exactly the push's."""
    sc = {"pool": {"size_min": 1, "size_max": 1500}, "accept_probability": 0.8}
    s = parse_scenario(sc)
    res = R.solve_rankdp(s)
    plan = R._plan(s)
    rl = R._optimal_rule(plan.md, plan, "")
    k = len(res.rank_distribution.probabilities)
    assert k < 200
    fin, _b, _none, _sh = R._push(plan.md, rl, k)
    assert res.rank_distribution.probabilities == pytest.approx(list(fin[1:k + 1]), abs=1e-13)


def test_policy_groups_are_group_thresholds():
    from seqpick.results import group_thresholds
    for sc in ({"pool": {"size": 3000}, "goal": {"type": "rank"}},
               {"pool": {"size": 400}, "goal": {"type": "rank"}, "cost_per_candidate": 0.2},
               {"pool": {"size": 300}, "goal": {"type": "top", "k": 6},
                "cost_per_candidate": 0.01},
               {"pool": {"size": 500}, "cost_per_candidate": 0.003},
               {"pool": {"size_mean": 50.0}, "goal": {"type": "rank"},
                "cost_per_candidate": 0.1}):
        res = _solve(sc)
        assert res.policy.groups == group_thresholds(res.policy.thresholds)


# --------------------------------------------------------------------------
# refusals
# --------------------------------------------------------------------------

@pytest.mark.parametrize("sc,field", [
    ({"pool": {"size_mean": 20}, "must_hire": True}, "must_hire"),
    ({"pool": {"size_min": 5, "size_max": 9}, "goal": {"type": "top", "k": 2},
      "must_hire": True}, "must_hire"),
    ({"pool": {"size": 20}, "goal": {"type": "top", "k": 2}, "openings": 2}, "openings"),
    ({"pool": {"size": 20}, "goal": {"type": "rank"}, "openings": 2}, "openings"),
    ({"pool": {"size": 100_000}, "openings": 50}, "openings"),
    ({"pool": {"size": 20}, "compare": [{"skip": 3}, {"start_share": 0.3}]},
     "compare.1.start_share"),
    ({"pool": {"size": 20}, "accept_probability": 0.5, "compare": [{"score_at_least": 3}]},
     "compare.0.score_at_least"),
])
def test_refusals(sc, field):
    with pytest.raises(ScenarioError) as e:
        _solve(sc)
    assert e.value.field == field
    assert len(e.value.message) > 20


def test_known_size_in_other_forms_allows_must_hire():
    a = _solve({"pool": {"size_min": 9, "size_max": 9}, "must_hire": True,
                "accept_probability": 0.7})
    b = _solve({"pool": {"size": 9}, "must_hire": True, "accept_probability": 0.7})
    assert a.outcome == b.outcome and a.policy.thresholds == b.policy.thresholds


def test_rank_with_uncertain_pool_counts_no_hire_as_n_plus_1():
    res = _solve({"pool": {"size_min": 1, "size_max": 6}, "goal": {"type": "rank"}})
    assert any("n+1" in n for n in res.notes)
    assert res.p_no_hire > 0


# --------------------------------------------------------------------------
# advice
# --------------------------------------------------------------------------

def _seen(ranks, **last):
    out = [{"relative_rank": j} for j in ranks]
    out[-1].update(last)
    return out


def test_advice_classic_values():
    n = 40
    r = max(range(n), key=lambda x: (_classic(n, x), -x))
    sc = {"pool": {"size": n}, "cost_per_candidate": 0.0, "accept_probability": 1.0}
    s = parse_scenario(sc)
    for i in (5, r, r + 1, 30, n):
        a = R.advise_rankdp(s, _state(s, [1] + [2] * (i - 2) + [1] if i > 1 else [1]))
        assert a.offer_value == pytest.approx(i / n, abs=1e-14)
        start = max(i, r)
        assert a.pass_value == pytest.approx(_classic(n, start) if start < n else 0.0,
                                             abs=1e-14)
        assert a.decision == ("offer" if i > r else "pass")


def _state(s, ranks, offers=()):
    from seqpick.advise import parse_seen
    seen = [{"relative_rank": j} for j in ranks]
    for idx, declined in offers:
        seen[idx].update(offered=True, declined=declined)
    return parse_seen(seen, s)


@pytest.mark.parametrize("sc", [
    {"pool": {"size_weights": [0, 1, 0, 0, 1, 2]}, "accept_probability": 0.6,
     "cost_per_candidate": 0.01},
    {"pool": {"size": 6}, "goal": {"type": "top", "k": 2}, "must_hire": True},
    {"pool": {"size_min": 0, "size_max": 6}, "goal": {"type": "rank"}, "must_hire": False,
     "cost_per_candidate": 0.05},
    {"pool": {"size": 6}, "openings": 2, "accept_probability": 0.7},
])
def test_advice_matches_brute_force_after_deviations(sc):
    """Offer/pass values from the actual state equal the brute-force optimal
    continuation, whatever happened before (passes against the plan, declines)."""
    s = parse_scenario(sc)
    prior = pool_prior(s.pool)
    brute = Brute(prior, s.goal.type, k=s.goal.k or 1, p=s.accept_probability,
                  m=s.openings, c=s.cost_per_candidate, must_hire=s.must_hire)
    histories = [(1,), (1, 1), (1, 2, 1), (1, 1, 3, 2), (1, 2, 3, 1, 2), (1, 1, 1, 1, 1, 4)]
    for h in histories:
        if s.pool.max_size < len(h) or prior[len(h):] == [0] * (len(prior) - len(h)):
            continue
        # earlier best-so-far candidates were offered and declined: a deviation the
        # plan did not expect; the state is still (stage, openings left)
        offers = [(idx, True) for idx in range(len(h) - 1) if h[idx] == 1]
        state = _state(s, list(h), offers)
        a = R.advise_rankdp(s, state)
        off, pas = brute.advice_values(h, s.openings)
        assert a.offer_value == pytest.approx(off, abs=1e-12), h
        assert a.pass_value == pytest.approx(pas, abs=1e-12), h
        better_offer = off < pas if s.goal.type == "rank" else off > pas
        if abs(off - pas) > 1e-9:
            forced = s.must_hire and len(h) == s.pool.max_size
            assert (a.decision == "offer") == (better_offer or forced), h


def test_advice_words_and_dispatch():
    sc = {"pool": {"size": 40}, "accept_probability": 0.8}
    a = advise(sc, _seen([1] + [2] * 10 + [1]))
    assert a.decision == "pass" and "waits until candidate" in a.reason
    assert a.plan_decision == "pass" and a.threshold == 0
    a = advise(sc, _seen([1] + [2] * 14 + [1]))
    assert a.decision == "offer" and "offer now" in a.reason
    a = advise({"pool": {"size": 10}, "must_hire": True, "accept_probability": 0.9},
               _seen([1] + [2] * 8 + [5]))
    assert a.decision == "offer" and "must_hire" in a.reason
    a = advise({"pool": {"size": 12}, "goal": {"type": "rank"}}, _seen([1, 2, 3]))
    assert a.value_kind == "expected_rank" and a.decision == "pass"
    with pytest.raises(ScenarioError):
        advise({"pool": {"size_weights": [1, 1]}, "accept_probability": 0.5},
               _seen([1, 1, 1]))


# --------------------------------------------------------------------------
# properties
# --------------------------------------------------------------------------

pools = st.one_of(
    st.integers(1, 60).map(lambda n: {"size": n}),
    st.tuples(st.integers(0, 30), st.integers(1, 40)).map(
        lambda ab: {"size_min": min(ab), "size_max": max(max(ab), 1)}),
    st.floats(0.5, 30).map(lambda m: {"size_mean": m}),
    st.lists(st.integers(0, 5), min_size=1, max_size=40).filter(any).map(
        lambda w: {"size_weights": w}),
)


@st.composite
def scenarios(draw):
    pool = draw(pools)
    fixed = "size" in pool
    goal = draw(st.sampled_from([{"type": "best"}, {"type": "top", "k": 2},
                                 {"type": "top", "k": 3}, {"type": "rank"}]))
    m = draw(st.integers(1, 3)) if goal["type"] == "best" else 1
    if fixed:
        m = min(m, pool["size"])
    sc = {"pool": pool, "goal": goal, "openings": m,
          "accept_probability": draw(st.sampled_from([1.0, 0.9, 0.5, 0.25])),
          "cost_per_candidate": draw(st.sampled_from([0.0, 0.001, 0.02])),
          "must_hire": draw(st.booleans()) if (fixed or goal["type"] == "rank") else False,
          "compare": [{"skip": draw(st.integers(0, 10))}, {"skip_share": 0.3}]}
    try:
        parse_scenario(sc)
    except ScenarioError:
        sc["goal"] = {"type": "best"}
        sc["compare"] = [{"skip_share": 0.3}]
    return sc


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(scenarios())
def test_properties(sc):
    s = parse_scenario(sc)
    res = R.solve_rankdp(s)
    json.dumps(res.to_dict(), allow_nan=False)
    opt = _objective(res, s)
    assert opt == pytest.approx(R._plan(s).value, abs=1e-12)
    for rr in [res] + list(res.compare):
        o = rr.outcome
        for v in (o.best, o.other, o.none, o.forced_last, rr.p_no_hire):
            assert 0.0 <= v <= 1.0
        assert o.best + o.other + o.none + o.forced_last == pytest.approx(1.0, abs=1e-12)
        if rr.success_probability is not None:
            assert 0.0 <= rr.success_probability <= 1.0
        if rr.rank_distribution is not None:
            d = rr.rank_distribution
            assert all(0 <= v <= 1 for v in d.probabilities)
            assert math.fsum(d.probabilities) + d.rest + d.none == pytest.approx(1, abs=1e-12)
        if rr.top is not None:
            vals = [rr.top[k] for k in ("1", "2", "3", "5", "10")]
            assert vals == sorted(vals)
        if rr is not res:
            if s.goal.type == "rank":
                assert _objective(rr, s) >= opt - 1e-12
            else:
                assert _objective(rr, s) <= opt + 1e-12
    if s.goal.type == "top" and "size" in sc["pool"] and s.cost_per_candidate == 0:
        t = res.policy.thresholds
        assert all(a <= b for a, b in zip(t, t[1:]))
    if res.curve is not None:
        assert all(0 <= v <= 1 for v in res.curve.success)
