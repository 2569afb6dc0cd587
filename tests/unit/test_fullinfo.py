"""Full-information engine: scores from a known distribution (goals best / score).

Independent checks used here
----------------------------
* Published values.  Gilbert, J. P. & Mosteller, F. (1966). Recognizing the
  maximum of a sequence. J. Amer. Statist. Assoc. 61, 35-73, section 3 (the
  decision numbers b_k and the chance of success for small n; from memory,
  confirmed below by root finding and exact brute force).  The limit 0.580164
  (Samuels, S. M. (1991). Secretary problems. Handbook of Sequential Analysis,
  381-405; from memory) with the formula
  P = e^-c + (e^c - c - 1) int_1^inf e^(-c x)/x dx, int_0^c (e^t - 1)/t dt = 1
  (from memory; evaluated here with scipy).  Moser, L. (1956). On a problem of
  Cayley. Scripta Math. 22, 289-292: for uniform(0,1) scores the values obey
  v_1 = 1/2, v_(k+1) = (1 + v_k^2)/2 (1/2, 5/8, 89/128, ...), checked with
  fractions.
* scipy: brentq on the defining equation of the decision numbers, quad of
  E[max(X, c)] for Moser's recursion with normal scores.
* An exact brute force for N <= 4: backward recursion over (stage, running
  maximum) integrated by 4-point Gauss-Legendre on the pieces between the bars,
  where every integrand is a polynomial of degree <= N (so the rule is exact).
* numpy simulation of the returned policy (fixed seeds, 4 standard errors).
* Hypothesis: probabilities in [0, 1], outcome and rank tables sum to 1, the
  optimal rule beats every compared rule, bars fall over the stages.
"""

from __future__ import annotations

import json
import math
from fractions import Fraction
from math import comb

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import integrate, optimize, stats

from seqpick import ScenarioError, advise, solve
from seqpick import fullinfo as F
from seqpick.api import call
from seqpick.classic import evaluate_skip
from seqpick.distributions import Normal, Sample, Uniform

GLX, GLW = np.polynomial.legendre.leggauss(4)   # exact to degree 7 >= N here

UNIF = {"distribution": "uniform", "low": 0, "high": 1}
NORM = {"distribution": "normal", "mean": 70, "sd": 10}
SAMPLE_VALUES = [61, 72, 55, 90, 83, 77, 64, 70, 58, 81, 66, 74]
SAMP = {"distribution": "sample", "values": SAMPLE_VALUES}


def _gl(f, lo, hi):
    if hi <= lo:
        return 0.0
    mid, half = 0.5 * (lo + hi), 0.5 * (hi - lo)
    return half * sum(w * f(mid + half * x) for x, w in zip(GLX, GLW))


def _pieces(lo, hi, cuts):
    pts = sorted({lo, hi, *[c for c in cuts if lo < c < hi]})
    return list(zip(pts, pts[1:]))


def brute_best(n, a, p, i=0, m=0.0):
    """P(hire the best) under "offer to a record with quantile >= a[t] at stage t",
    from "i seen, maximum m, no hire" (exact for small n, see the module docstring)."""
    if i >= n:
        return 0.0
    t = i + 1
    k = n - t
    bar = a[t]
    val = m * brute_best(n, a, p, t, m) if m > 0 else 0.0

    def rec(u):
        if u >= bar:
            return p * u ** k + (1 - p) * brute_best(n, a, p, t, u)
        return brute_best(n, a, p, t, u)

    for lo, hi in _pieces(m, 1.0, list(a[1:]) + [bar]):
        val += _gl(rec, lo, hi)
    return val


def brute_any_best(n, bars, p, i=0, m=0.0):
    """P(the hire is the overall best) for "offer to anyone with quantile >= bars[t-1]"
    from "i seen, maximum m, no hire": a recursion over the running maximum,
    independent of the product formula used by the engine."""
    if i >= n:
        return 0.0
    t = i + 1
    k = n - t
    bar = bars[t - 1]

    def f(u):
        nxt = brute_any_best(n, bars, p, t, max(m, u))
        if u >= bar:
            win = u ** k if u > m else 0.0
            return p * win + (1 - p) * nxt
        return nxt

    return sum(_gl(f, lo, hi) for lo, hi in _pieces(0.0, 1.0, list(bars) + [m]))


# --------------------------------------------------------------------------
# decision numbers (goal best)
# --------------------------------------------------------------------------

def test_decision_numbers_published():
    b, bc = F.decision_numbers(8)
    assert b[0] == 0.0
    assert b[1] == pytest.approx(0.5, abs=1e-15)
    assert b[2] == pytest.approx(1.0 / (math.sqrt(6.0) - 1.0), abs=1e-15)   # y^2 + 2y = 5
    # Gilbert & Mosteller (1966), decision numbers b_1..b_7 (from memory, 4 decimals)
    for k, want in enumerate([0.5, 0.6899, 0.7758, 0.8246, 0.8559, 0.8778, 0.8939], start=1):
        assert b[k] == pytest.approx(want, abs=6e-5)
    assert all(abs(x + y - 1.0) < 1e-15 for x, y in zip(b, bc))


def test_decision_numbers_vs_brentq_on_the_defining_equation():
    # sum_{j=1}^{k} (b^-j - 1)/j = 1  (the form in the module docstring)
    b, _ = F.decision_numbers(5001)
    for k in list(range(1, 61)) + [100, 1000, 5000]:
        def h(x, k=k):
            j = np.arange(1, k + 1)
            return float(np.sum(np.expm1(-j * np.log(x)) / j)) - 1.0
        root = optimize.brentq(h, max(0.01, 1 - 3.0 / k), 1 - 1e-12, xtol=1e-16, rtol=1e-15)
        assert b[k] == pytest.approx(root, abs=2e-14)


def test_k_times_one_minus_b_tends_to_gm_constant():
    c = optimize.brentq(lambda c: integrate.quad(lambda t: math.expm1(t) / t, 0, c)[0] - 1,
                        0.1, 2.0, xtol=1e-15)
    assert c == pytest.approx(0.8043522628, abs=1e-9)   # from memory: 0.804352...
    b, bc = F.decision_numbers(20001)
    z = bc[20000] / b[20000]
    assert 20000 * z == pytest.approx(c, abs=1e-4)


@pytest.mark.parametrize("p", [0.3, 0.75])
def test_decision_numbers_with_declines_vs_brentq(p):
    # sum_y C(k,y) z^y rho_y = 1, rho_y = p prod_{t=2}^{y} (t - p)/t
    b, _ = F.decision_numbers(40, p)
    for k in (1, 2, 3, 7, 20, 39):
        rho = [0.0, p]
        for y in range(2, k + 1):
            rho.append(rho[-1] * (y - p) / y)

        def h(z, k=k, rho=rho):
            return sum(comb(k, y) * z ** y * rho[y] for y in range(1, k + 1)) - 1.0
        z = optimize.brentq(h, 1e-9, 1e3, xtol=1e-15)
        assert b[k] == pytest.approx(1.0 / (1.0 + z), abs=1e-13)
    assert b[1] == pytest.approx(p / (1 + p), abs=1e-15)
    assert all(b[k] < b[k + 1] for k in range(len(b) - 1))


# --------------------------------------------------------------------------
# chance of success (goal best)
# --------------------------------------------------------------------------

def test_success_small_n_published():
    # n = 1: 1; n = 2: 3/4 (exact); n = 3..5: Gilbert & Mosteller (1966) Table
    # (from memory, 4 decimals)
    want = {1: 1.0, 2: 0.75, 3: 0.6843, 4: 0.6554, 5: 0.6392}
    for n, w in want.items():
        r = solve({"pool": {"size": n}, "scores": UNIF})
        assert r.success_probability == pytest.approx(w, abs=6e-5 if n > 2 else 1e-15)


@pytest.mark.parametrize("n,p", [(2, 1.0), (3, 1.0), (4, 1.0), (3, 0.6), (4, 0.35)])
def test_success_vs_exact_brute_force(n, p):
    a, ac = F.best_bars(n, p)
    r = solve({"pool": {"size": n}, "scores": UNIF, "accept_probability": p})
    assert r.success_probability == pytest.approx(brute_best(n, a, p), abs=1e-13)


@pytest.mark.parametrize("n,p", [(4, 1.0), (4, 0.6)])
def test_the_bars_are_optimal_locally(n, p):
    # moving any bar up or down lowers the exact chance of success
    a, ac = F.best_bars(n, p)
    base = brute_best(n, a, p)
    for t in range(1, n):
        for d in (-0.02, 0.02):
            b = list(a)
            b[t] = min(1.0, max(0.0, b[t] + d))
            assert brute_best(n, b, p) < base


def test_limit():
    c = optimize.brentq(lambda c: integrate.quad(lambda t: math.expm1(t) / t, 0, c)[0] - 1,
                        0.1, 2.0, xtol=1e-15)
    lim = math.exp(-c) + (math.exp(c) - c - 1) * integrate.quad(
        lambda x: math.exp(-c * x) / x, 1, math.inf, epsabs=1e-15, limit=200)[0]
    assert lim == pytest.approx(0.580164, abs=5e-7)          # Samuels (1991), from memory
    assert F.FULL_INFO_LIMIT == pytest.approx(lim, abs=1e-9)
    n = 2000
    r = solve({"pool": {"size": n}, "scores": UNIF})
    # the finite-n chance falls to the limit like 0.28/n
    assert 0.0 < r.success_probability - lim < 0.3 / n
    assert r.limits[0].value == F.FULL_INFO_LIMIT


def test_success_does_not_depend_on_the_distribution():
    res = [solve({"pool": {"size": 25}, "scores": sc}) for sc in (UNIF, NORM, SAMP)]
    for r in res[1:]:
        assert r.success_probability == pytest.approx(res[0].success_probability, abs=1e-15)
        assert r.rank_distribution.probabilities == pytest.approx(
            res[0].rank_distribution.probabilities, abs=1e-15)


def test_skip_rules_agree_with_the_classic_engine():
    for n, r, must in [(10, 3, False), (10, 3, True), (57, 20, True), (400, 147, False),
                       (9, 0, True), (2, 1, False)]:
        a, ac = F._skip_bars(n, r)
        pf = F._eval_record_rule(n, a, ac, 1.0, must, Uniform(0, 1), rank_based=True)
        cl = evaluate_skip(n, r, must_hire=must)
        assert pf.success == pytest.approx(cl.success_probability, abs=1e-14)
        assert pf.none == pytest.approx(cl.p_no_hire, abs=1e-14)
        assert pf.forced == pytest.approx(cl.outcome.forced_last, abs=1e-14)
        assert pf.seen == pytest.approx(cl.expected_interviews, rel=1e-13)
        assert pf.ranks.head == pytest.approx(cl.rank_distribution.probabilities, abs=1e-14)
        # for a rank-based rule and uniform scores, E[U | rank a] = (n + 1 - a)/(n + 1)
        hire = 1 - pf.none
        eu = sum(pa * (n - i) for i, pa in enumerate(cl.rank_distribution.probabilities))
        if n <= 200:
            assert pf.score_sum == pytest.approx(eu / (n + 1), abs=1e-13)
        assert 0 < hire <= 1


# --------------------------------------------------------------------------
# goal score: Moser's recursion
# --------------------------------------------------------------------------

def test_moser_uniform_exact_rationals():
    v = [Fraction(0)]
    for k in range(1, 13):
        prev = v[-1] if k > 1 else None
        v.append(Fraction(1, 2) if k == 1 else (1 + prev * prev) / 2)
    assert v[1:4] == [Fraction(1, 2), Fraction(5, 8), Fraction(89, 128)]   # Moser (1956)
    for n in range(1, 13):
        r = solve({"pool": {"size": n}, "goal": {"type": "score"}, "scores": UNIF})
        assert r.expected_score == pytest.approx(float(v[n]), abs=1e-15)
        assert r.p_no_hire == 0.0
        plan = F.score_bars(n, 1, 1.0, 0.0, True, Uniform(0, 1))
        # the bar with k candidates to come is v_k
        for k in range(1, n):
            assert plan.bars[1][k] == pytest.approx(float(v[k]), abs=1e-15)


def test_moser_uniform_asymptotic():
    # Gilbert & Mosteller (1966): v_n ~ 1 - 2/(n + ln n + 1.767) (from memory)
    for n, tol in [(100, 2e-5), (1000, 5e-8)]:
        r = solve({"pool": {"size": n}, "goal": {"type": "score"}, "scores": UNIF})
        lim = [x for x in r.limits if x.quantity == "expected_score"][0]
        assert lim.value == pytest.approx(1 - 2 / (n + math.log(n) + 1.767), abs=1e-15)
        assert r.expected_score == pytest.approx(lim.value, abs=tol)


def test_moser_normal_with_declines_and_cost_vs_quad():
    mu, sd, p, c = 70.0, 10.0, 0.7, 0.4
    dist = Normal(mu, sd)
    V = [0.0]
    for k in range(1, 9):
        prev = V[-1]
        if k == 1:
            V.append(-c + p * mu)
            continue
        ex = integrate.quad(lambda x: (x - prev) * stats.norm.pdf(x, mu, sd), prev, np.inf,
                            epsabs=1e-13)[0]
        V.append(-c + prev + p * ex)
    plan = F.score_bars(8, 1, p, c, True, dist)
    assert plan.value == pytest.approx(V[8], rel=1e-12)
    r = solve({"pool": {"size": 8}, "goal": {"type": "score"}, "scores": NORM,
               "accept_probability": p, "cost_per_candidate": c})
    # objective = E[score; hire] - c E[interviews] = V_8
    obj = r.expected_score * (1 - r.p_no_hire) - r.expected_cost
    assert obj == pytest.approx(V[8], rel=1e-12)


def test_goal_score_success_vs_brute_force():
    for n, p, sc in [(3, 1.0, UNIF), (4, 1.0, NORM), (4, 0.6, NORM)]:
        s = {"pool": {"size": n}, "goal": {"type": "score"}, "scores": sc,
             "accept_probability": p}
        r = solve(s)
        dist = Uniform(0, 1) if sc is UNIF else Normal(70, 10)
        plan = F.score_bars(n, 1, p, 0.0, True, dist)
        bars = [0.0 if plan.forced[1][n - i] else dist.cdf(plan.bars[1][n - i])
                for i in range(1, n + 1)]
        assert r.success_probability == pytest.approx(brute_any_best(n, bars, p), abs=1e-13)


def test_score_at_least_two_exact_ways():
    # P(best) for a constant bar: E[(1 - (1-p)^K)/K], K ~ Bin(n, q) (+ forced best),
    # against the Gauss-Legendre/Horner evaluation of the general formula
    for n, c, p in [(10, 0.7, 1.0), (10, 0.7, 0.6), (40, 0.93, 0.8)]:
        exact = sum(comb(n, k) * (1 - c) ** k * c ** (n - k) * (1 - (1 - p) ** k) / k
                    for k in range(1, n + 1))
        tot, _ = F._r1_best(n, [c] * n, p)
        assert tot == pytest.approx(exact, abs=1e-14)
        pf = F._eval_constant(n, c, p, False, Uniform(0, 1), "best", 0.0)
        assert pf.success == pytest.approx(exact, abs=1e-14)
        assert pf.none == pytest.approx((1 - p * (1 - c)) ** n, abs=1e-15)
        tot2, _ = F._r1_best(n, [c] * (n - 1) + [0.0], p)
        pf2 = F._eval_constant(n, c, p, True, Uniform(0, 1), "best", 0.0)
        assert pf2.success == pytest.approx(tot2, abs=1e-14)


# --------------------------------------------------------------------------
# simulation of the returned policies
# --------------------------------------------------------------------------

def _vec_quantile(dist):
    if isinstance(dist, Uniform):
        return lambda u: dist.low + dist.width * u
    if isinstance(dist, Normal):
        from scipy.special import ndtri
        return lambda u: dist.mu + dist.sd * ndtri(u)
    return lambda u: np.interp(u, dist.fs, dist.xs)


def _simulate(n, barsx, record_only, p, must, dist, reps, seed):
    """Run the policy: offer at stage t when the score >= barsx[t-1] (None = anyone)
    and, for record rules, the candidate beats everyone so far."""
    rng = np.random.default_rng(seed)
    qf = _vec_quantile(dist)
    bars = np.array([-np.inf if b is None else b for b in barsx])
    out = {"win": 0, "none": 0, "forced": 0, "seen": 0.0, "score": 0.0,
           "rank": np.zeros(n + 2)}
    chunk = max(1, 2_000_000 // n)
    done = 0
    while done < reps:
        m = min(chunk, reps - done)
        done += m
        U = rng.random((m, n))
        X = qf(U)
        acc = rng.random((m, n)) < p
        prev = np.concatenate([np.full((m, 1), -1.0), np.maximum.accumulate(U, 1)[:, :-1]], 1)
        rec = U > prev
        offer = X >= bars
        if record_only:
            offer &= rec
        forced_st = np.zeros(n, bool)
        if must:
            if record_only:
                forced_st[n - 1] = True
                offer[:, n - 1] = True
            else:
                forced_st = np.isneginf(bars)
        hire = offer & acc
        any_ = hire.any(1)
        idx = np.where(any_, hire.argmax(1), 0)
        rows = np.arange(m)
        hv = U[rows, idx]
        rank = np.where(any_, 1 + (U > hv[:, None]).sum(1), 0)
        if record_only:
            forced = any_ & (idx == n - 1) & ~rec[rows, idx] & must
        else:
            forced = any_ & forced_st[idx]
        out["win"] += int((rank == 1).sum())
        out["none"] += int((~any_).sum())
        out["forced"] += int(forced.sum())
        out["seen"] += float(np.where(any_, idx + 1, n).sum())
        out["score"] += float(np.where(any_, X[rows, idx], 0.0).sum())
        out["rank"] += np.bincount(rank, minlength=n + 2)[:n + 2]
    return out


def _close(x, k, reps, z=4.0):
    phat = k / reps
    se = math.sqrt(max(phat * (1 - phat), 1.0 / reps) / reps)
    assert abs(x - phat) <= z * se, (x, phat, se)


@pytest.mark.parametrize("n,sc,p,must", [
    (20, UNIF, 1.0, True), (20, NORM, 0.6, False), (20, SAMP, 0.8, True),
    (200, NORM, 1.0, False), (200, UNIF, 0.5, False)])
def test_goal_best_by_simulation(n, sc, p, must):
    s = {"pool": {"size": n}, "scores": sc, "accept_probability": p, "must_hire": must,
         "compare": [{"skip_share": 0.37}, {"score_at_least": 80 if sc is not UNIF else 0.9}]}
    r = solve(s)
    dist = {"uniform": Uniform(0, 1), "normal": Normal(70, 10),
            "sample": Sample(SAMPLE_VALUES)}[sc["distribution"]]
    reps = 60_000 if n == 20 else 20_000
    sim = _simulate(n, r.policy.score_thresholds, True, p, must, dist, reps, seed=n + 7)
    _close(r.success_probability, sim["win"], reps)
    _close(r.p_no_hire, sim["none"], reps)
    _close(r.outcome.forced_last, sim["forced"], reps)
    assert r.expected_interviews == pytest.approx(sim["seen"] / reps, abs=4 * n / math.sqrt(reps))
    if r.rank_distribution is not None:
        for a_ in range(1, 6):
            _close(r.rank_distribution.probabilities[a_ - 1], sim["rank"][a_], reps)
        _close(r.top["5"], sim["rank"][1:6].sum(), reps)
    if r.expected_score is not None:
        spread = {"uniform": 1.0, "normal": 30.0, "sample": 40.0}[sc["distribution"]]
        assert r.expected_score * (1 - r.p_no_hire) == pytest.approx(
            sim["score"] / reps, abs=4 * spread / math.sqrt(reps))
    # the compared skip rule by simulation too
    rr = r.compare[0]
    k = int(math.floor(0.37 * n))
    sim2 = _simulate(n, [math.inf] * k + [None] * (n - k), True, p, must, dist, reps, seed=3)
    _close(rr.success_probability, sim2["win"], reps)
    _close(rr.p_no_hire, sim2["none"], reps)


@pytest.mark.parametrize("n,sc,p,c,must", [
    (20, UNIF, 1.0, 0.0, True), (20, NORM, 0.7, 0.3, True), (20, SAMP, 0.8, 0.0, False),
    (200, NORM, 0.9, 0.05, True)])
def test_goal_score_by_simulation(n, sc, p, c, must):
    s = {"pool": {"size": n}, "goal": {"type": "score"}, "scores": sc,
         "accept_probability": p, "cost_per_candidate": c, "must_hire": must,
         "compare": [{"score_at_least": 80 if sc is not UNIF else 0.9}]}
    r = solve(s)
    dist = {"uniform": Uniform(0, 1), "normal": Normal(70, 10),
            "sample": Sample(SAMPLE_VALUES)}[sc["distribution"]]
    reps = 60_000 if n == 20 else 20_000
    sim = _simulate(n, r.policy.score_thresholds, False, p, must, dist, reps, seed=n + 11)
    _close(r.p_no_hire, sim["none"], reps)
    _close(r.outcome.forced_last, sim["forced"], reps)
    if r.success_probability is not None:
        _close(r.success_probability, sim["win"], reps)
    spread = {"uniform": 1.0, "normal": 30.0, "sample": 40.0}[sc["distribution"]]
    assert r.expected_score * (1 - r.p_no_hire) == pytest.approx(
        sim["score"] / reps, abs=4 * spread / math.sqrt(reps))
    assert r.expected_interviews == pytest.approx(sim["seen"] / reps, abs=4 * n / math.sqrt(reps))
    cr = r.compare[0]
    sim2 = _simulate(n, [cr.rule["score_at_least"]] * (n - 1) + [None if must else
                     cr.rule["score_at_least"]], False, p, must, dist, reps, seed=5)
    _close(cr.success_probability, sim2["win"], reps)
    for a_ in range(1, 4):
        _close(cr.rank_distribution.probabilities[a_ - 1], sim2["rank"][a_], reps)


def test_several_openings_by_simulation():
    n, m, p = 30, 3, 0.8
    dist = Normal(70, 10)
    r = solve({"pool": {"size": n}, "goal": {"type": "score"}, "scores": NORM,
               "openings": m, "accept_probability": p, "must_hire": False})
    bars = r.policy.score_thresholds_by_openings_left
    rng = np.random.default_rng(1)
    reps = 40_000
    X = _vec_quantile(dist)(rng.random((reps, n)))
    A = rng.random((reps, n)) < p
    left = np.full(reps, m)
    total = np.zeros(reps)
    for i in range(n):
        b = np.array([np.inf] + [(-np.inf if bars[str(l)][i] is None else bars[str(l)][i])
                                 for l in range(1, m + 1)])
        take = (left > 0) & (X[:, i] >= b[left]) & A[:, i]
        total += np.where(take, X[:, i], 0.0)
        left -= take
    hires = m - left
    assert r.expected_hires == pytest.approx(hires.mean(), abs=4 * hires.std() / math.sqrt(reps))
    est = total.mean()
    assert r.expected_score * (1 - r.p_no_hire) == pytest.approx(
        est, abs=4 * total.std() / math.sqrt(reps))


# --------------------------------------------------------------------------
# advice
# --------------------------------------------------------------------------

def test_advice_values_vs_brute_force():
    n, p = 4, 0.6
    s = {"pool": {"size": n}, "scores": UNIF, "accept_probability": p}
    a, ac = F.best_bars(n, p)
    for seen in ([0.3], [0.3, 0.9], [0.95, 0.2], [0.1, 0.5, 0.55], [0.9, 0.1, 0.2]):
        adv = advise(s, [{"score": x} for x in seen])
        i = len(seen)
        m = max(seen)
        k = n - i
        w = brute_best(n, a, p, i, m)
        assert adv.pass_value == pytest.approx(w, abs=1e-13)
        if seen[-1] == m:
            assert adv.offer_value == pytest.approx(p * m ** k + (1 - p) * w, abs=1e-13)
            assert adv.decision == ("offer" if m >= a[i] else "pass")
        else:
            assert adv.decision == "pass"
            assert adv.offer_value == pytest.approx((1 - p) * w, abs=1e-13)
        assert adv.value_kind == "success_probability"


def test_advice_follows_the_plan_and_forced_last():
    s = {"pool": {"size": 20}, "scores": NORM, "must_hire": True}
    r = solve(s)
    bars = r.policy.score_thresholds
    adv = advise(s, [{"score": 60}, {"score": bars[1] + 0.01}])
    assert adv.decision == "offer" and "beats everyone so far" in adv.reason
    adv = advise(s, [{"score": 60}, {"score": bars[1] - 0.01}])
    assert adv.decision == "pass"
    seen = [{"score": 99}] + [{"score": 50}] * 19
    adv = advise(s, seen)
    assert adv.decision == "offer" and adv.stage == 20
    # goal score: the bar of Moser's recursion
    s2 = {"pool": {"size": 10}, "goal": {"type": "score"}, "scores": UNIF}
    plan = F.score_bars(10, 1, 1.0, 0.0, True, Uniform(0, 1))
    adv = advise(s2, [{"score": 0.1}, {"score": 0.86}])
    assert adv.score_threshold == pytest.approx(plan.bars[1][8], abs=1e-15)
    assert adv.decision == ("offer" if 0.86 >= plan.bars[1][8] else "pass")
    assert adv.offer_value == pytest.approx(0.86, abs=1e-15)


# --------------------------------------------------------------------------
# refused combinations, warnings, JSON
# --------------------------------------------------------------------------

@pytest.mark.parametrize("extra,field", [
    ({"pool": {"size_min": 5, "size_max": 9}}, "pool"),
    ({"goal": {"type": "top", "k": 2}}, "goal.type"),
    ({"goal": {"type": "rank"}}, "goal.type"),
    ({"openings": 2}, "openings"),
    ({"cost_per_candidate": 0.01}, "cost_per_candidate"),
    ({"compare": [{"skip": 1}, {"start_share": 0.3}]}, "compare.1.start_share"),
])
def test_refused(extra, field):
    s = {"pool": {"size": 9}, "scores": UNIF}
    s.update(extra)
    with pytest.raises(ScenarioError) as e:
        solve(s)
    assert e.value.field == field


def test_small_sample_warning_and_json():
    s = {"pool": {"size": 12}, "goal": {"type": "score"}, "openings": 2, "scores": SAMP}
    reply = json.loads(call("solve", json.dumps(s)))
    assert reply["ok"]
    res = reply["result"]
    assert res["warnings"] == ["only 12 past scores: the cutoffs are rough"]
    assert res["success_probability"] is None and res["outcome"]["best"] is None
    assert res["policy"]["score_thresholds_by_openings_left"]["2"][0] is not None


# --------------------------------------------------------------------------
# properties
# --------------------------------------------------------------------------

scen = st.fixed_dictionaries({
    "n": st.integers(1, 40),
    "goal": st.sampled_from(["best", "score"]),
    "dist": st.sampled_from([UNIF, NORM, SAMP]),
    "p": st.sampled_from([1.0, 0.9, 0.5, 0.2]),
    "must": st.booleans(),
    "cost": st.sampled_from([0.0, 0.1, 2.0]),
    "share": st.floats(0.0, 0.95),
    "bar": st.floats(-0.5, 1.5),
})


@settings(max_examples=40, deadline=None)
@given(scen)
def test_properties(sp):
    n, goal, dist = sp["n"], sp["goal"], sp["dist"]
    lo, hi = (0.0, 1.0) if dist is UNIF else (40.0, 100.0)
    s = {"pool": {"size": n}, "goal": {"type": goal}, "scores": dist,
         "accept_probability": sp["p"], "must_hire": sp["must"],
         "cost_per_candidate": sp["cost"] if goal == "score" else 0.0,
         "compare": [{"skip_share": sp["share"]},
                     {"score_at_least": lo + sp["bar"] * (hi - lo)}]}
    r = solve(s)
    rules = [r] + list(r.compare)
    for rr in rules:
        o = rr.outcome
        vals = [o.best, o.other, o.none, o.forced_last]
        for v in vals + [rr.p_no_hire, rr.success_probability]:
            if v is not None and v == v:
                assert -1e-15 <= v <= 1 + 1e-15
        if all(v == v for v in vals):
            assert sum(vals) == pytest.approx(1.0, abs=1e-12)
        if rr.rank_distribution is not None:
            d = rr.rank_distribution
            assert sum(d.probabilities) + d.rest + d.none == pytest.approx(1.0, abs=1e-12)
            assert min(d.probabilities) >= 0 and d.rest >= 0
        assert 1.0 - 1e-12 <= rr.expected_interviews <= n + 1e-9
    # the optimal rule is at least as good as every compared rule
    if goal == "best":
        for rr in r.compare:
            assert r.success_probability >= rr.success_probability - 1e-12
    else:
        def obj(x):
            return (x.expected_score or 0.0) * (1 - x.p_no_hire) - x.expected_cost
        for rr in r.compare:
            if rr.expected_score is not None or rr.p_no_hire == 1.0:
                assert obj(r) >= obj(rr) - 1e-9 * max(1.0, abs(obj(r)))
    # bars fall over the stages (no declines, no cost)
    if sp["p"] == 1.0 and (goal == "best" or sp["cost"] == 0.0):
        b = [x for x in r.policy.score_thresholds if x is not None]
        assert all(x >= y - 1e-12 for x, y in zip(b, b[1:]))


# --------------------------------------------------------------------------
# the fast paths against the direct ones
# --------------------------------------------------------------------------

@pytest.mark.parametrize("p", [1.0, 0.7, 0.25, 0.03])
def test_taylor_decision_numbers_vs_newton(p):
    # the Taylor polynomial of w(1/k) (Cauchy integral) against Newton's method
    # on (GM) for every k, and against brentq at a few k
    n = 4000
    b, bc = F.decision_numbers(n, p)
    b0, bc0 = F._decision_numbers_newton(n, p)
    coef, kmin = F._w_taylor(p)
    assert kmin < n
    for k in range(1, n):
        assert bc[k] == pytest.approx(bc0[k], rel=3e-15)
        assert b[k] + bc[k] == pytest.approx(1.0, abs=4.5e-16)   # 2 ulps
    rho = [0.0, p]
    for y in range(2, 400):
        rho.append(rho[-1] * (y - p) / y)
    for k in (kmin, 3 * kmin, 3999):
        def h(z, k=k):
            t, s = 1.0, 0.0
            for y in range(1, 200):
                t *= (k - y + 1) / y * z
                s += t * rho[y]
            return s - 1.0
        z = optimize.brentq(h, 1e-6, 50.0 / k, xtol=1e-18, rtol=1e-15)
        assert bc[k] / b[k] == pytest.approx(z, rel=1e-13)


@pytest.mark.parametrize("n,p", [(600, 1.0), (600, 0.6), (2500, 1.0), (2500, 0.7)])
def test_summation_formula_vs_direct_sum(n, p):
    # the stage sums of the optimal rule by Euler-Maclaurin/Gregory against the
    # stage-by-stage sum (both exact to rounding)
    a, ac = F.best_bars(n, p)
    for must in (False, True):
        d = F._r2_core(n, a, ac, p, forced=must, co=F._Coef(p))
        e = F._r2_core_opt(n, a, ac, p, must, F._Coef(p))
        assert e is not None
        assert e.win == pytest.approx(d.win, abs=1e-13)
        assert e.none_reg == pytest.approx(d.none_reg, abs=1e-13)
        assert e.forced_mass == pytest.approx(d.forced_mass, abs=1e-13)
        assert e.seen == pytest.approx(d.seen, rel=1e-13)
        L = max(len(d.piJ), len(e.piJ))
        assert d.piJ + [0.0] * (L - len(d.piJ)) == pytest.approx(
            e.piJ + [0.0] * (L - len(e.piJ)), abs=1e-13)
    if p == 1.0:
        for dist in (Uniform(0, 100), Normal(70, 10), Sample(SAMPLE_VALUES * 30)):
            for must in (False, True):
                r0 = F._r2_scores(n, a, ac, dist, must)
                r1 = F._r2_scores_opt(n, a, ac, dist, must, 1.0)
                assert r1 is not None
                assert r1[0] == pytest.approx(r0[0], rel=1e-13)
                assert r1[1] == pytest.approx(r0[1], rel=1e-12, abs=1e-12)
    assert F._r2_core_opt(150, *F.best_bars(150, p), p, True, F._Coef(p)) is None


def test_narrow_cell_kernel_vs_quad():
    # a stage interval of width 8e-9 next to 1: the kernel must use the complements
    # (a difference of two numbers near 1 would lose 8 digits); checked in x = (1-u)/u,
    # where int u^e C(K,y) u^(K-y) (1-u)^y du = C(K,y) int x^y (1+x)^-(N+1) dx
    N, K = 20000, 10000
    z0, z1 = 0.80435 / (K + 1.0), 0.80435 / K        # bars b = 1/(1+z)
    lo, loc = 1.0 / (1.0 + z1), z1 / (1.0 + z1)
    hi, hic = 1.0 / (1.0 + z0), z0 / (1.0 + z0)
    C = F._cell_kernel(N, K, N - 1 - K, lo, loc, hi, hic, 6)
    for y in range(7):
        want = comb(K, y) * integrate.quad(lambda x: x ** y * (1.0 + x) ** -(N + 1), z0, z1,
                                           epsabs=0, epsrel=1e-13)[0]
        assert C[y] == pytest.approx(want, rel=1e-12)


def test_upper_z_chain_vs_ndtri():
    from scipy.special import ndtri
    for n, p in [(3000, 1.0), (50000, 0.7)]:
        a, ac = F.best_bars(n, p)
        z = F._upper_z_chain(ac[1:])
        for i in list(range(0, n - 1, 97)) + [n - 2]:
            want = -ndtri(ac[i + 1])
            assert z[i] == pytest.approx(want, abs=4e-15 * max(1.0, abs(want)))
        assert z[n - 1] == -math.inf          # the last bar is 0


def test_score_bars_inlined_paths_agree_with_upper_parts():
    class Plain:        # hides the type, so the generic upper_parts path is taken
        def __init__(self, d):
            self.d, self.mean = d, d.mean

        def upper_parts(self, c):
            return self.d.upper_parts(c)

        def excess(self, c):
            return self.d.excess(c)

    for d, m in [(Normal(70, 10), 1), (Sample(SAMPLE_VALUES), 3)]:
        a = F.score_bars(500, m, 0.8, 0.2, True, d)
        b = F.score_bars(500, m, 0.8, 0.2, True, Plain(d))
        for r in range(1, m + 1):
            assert list(a.bars[r]) == pytest.approx(list(b.bars[r]), abs=1e-13)
            assert list(a.upq[r]) == pytest.approx(list(b.upq[r]), abs=1e-15)
            assert list(a.pab[r]) == pytest.approx(list(b.pab[r]), abs=1e-12)
