"""Poisson arrivals over a time window: independent checks of seqpick.window.

Independent checks used here
----------------------------
* The threshold equation g(k, mu) = 0 re-solved with scipy.optimize.brentq on
  a g built from scipy.stats.poisson and numpy harmonic numbers.
* The optimal value against a continuous-time dynamic programme (the
  Kolmogorov backward equations of "k seen, time y", integrated with
  scipy.integrate.solve_ivp), which assumes nothing about the form of the rule.
* numpy simulation of the window with a fixed seed, 4 standard errors.
* The clock-only and skip rules against brute-force enumeration of all
  orders (n <= 8) mixed with Poisson weights, and against scipy quadrature.

Published facts
---------------
Bruss, F. T. (1984). A unified approach to a class of best choice problems
with an unknown number of options. Ann. Probab. 12, 882-889: with the number
of options unknown and arrival times iid with a known continuous law, "take
the first best-so-far after time T/e" wins with chance at least 1/e for every
number n >= 1 of options (the 1/e-law; statement from memory, confirmed below
numerically for n <= 300).  For Poisson arrivals the window can be empty, so
the true statement there is P(win) >= (1 - e^{-L T}) / e, also tested.
Cowan, R. & Zabczyk, J. (1978), Theory Probab. Appl. 23, 584-592, and Bruss
(1987), J. Appl. Probab. 24: the optimal chance tends to 1/e as L T grows.
"""

from __future__ import annotations

import datetime as dt
import itertools
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import integrate, optimize, stats
from scipy.special import hyp1f1

from seqpick import ScenarioError, advise, solve
from seqpick import window as w

E = math.e


def _hnum(n_max: int) -> np.ndarray:
    return np.concatenate([[0.0], np.cumsum(1.0 / np.arange(1, n_max + 1))])


def _g_scipy(k: int, mu: float) -> float:
    m = np.arange(0, int(mu + 40 * math.sqrt(mu) + 60))
    h = _hnum(k + len(m) + 2)
    c = k / (k + m) * (1.0 - (h[k + m - 1] - h[k - 1]))
    return float(np.sum(stats.poisson.pmf(m, mu) * c))


@pytest.mark.parametrize("k", [1, 2, 3, 5, 10, 40, 127, 128, 200, 1000])
def test_threshold_matches_brentq(k):
    # the chain of exact moves against brentq on an independent scipy sum
    root = optimize.brentq(lambda mu: _g_scipy(k, mu), 0.5, 2.0 * k + 5.0, xtol=1e-13,
                           rtol=1e-15)
    assert w.threshold(k) == pytest.approx(root, rel=1e-13)


@pytest.mark.parametrize("k", [1, 2, 63, 64, 129, 255, 1023, 1024, 5000, 33333])
def test_threshold_chain_matches_direct_root_finding(k):
    # segment starts, chain steps just before/after the extrapolation switch, large k
    assert w.threshold(k) == pytest.approx(w._direct_root(k), rel=2e-14)


def test_thresholds_do_not_depend_on_the_order_of_requests():
    ks = [1, 2, 130, 300, 3000, 3001, 3100, 20000]
    w._clear_caches()
    first = [w.threshold(k) for k in ks]
    w._clear_caches()
    second = [w.threshold(k) for k in reversed(ks)][::-1]
    w._clear_caches()
    w.threshold(3127)           # a whole segment at once, then a prefix of another
    third = [w.threshold(k) for k in ks]
    assert first == second == third


@pytest.mark.parametrize("n,mu", [(1, 2.12), (3, 5.35), (40, 68.8), (3000, 5154.0)])
def test_count_and_time_moves_match_direct_sums(n, mu):
    s, z, y = w._direct_triple(n, mu)
    ss, us, vs = w._forward_uv(n, mu, s, z, y, 12)
    # the count move contracts errors while n + d < mu; beyond, it may amplify them,
    # which the Poisson weights of the time move then make harmless (checked below)
    for d in [d for d in (1, 5, 12) if n + d < mu]:
        ds, dz, dy = w._direct_triple(n + d, mu)
        assert ss[d] == pytest.approx(ds, rel=1e-12)
        assert us[d] - w._hdiff(n - 1, n + d - 1) * ss[d] == pytest.approx(dz, rel=1e-12)
        assert vs[d] - w._hdiff(n - 1, n + d - 1) == pytest.approx(dy, rel=1e-12)
    # time move by delta with 23 Poisson terms
    delta = 1.7
    ss, us, vs = w._forward_uv(n, mu, s, z, y, w._D)
    p = w._pd(delta, w._D)
    moved = [math.fsum(a * b for a, b in zip(p, col)) for col in (ss, us, vs)]
    want = w._direct_triple(n, mu + delta)
    assert moved == pytest.approx(list(want), rel=1e-14)


def test_xstar_matches_brentq():
    f = lambda x: sum(x ** n / (n * math.factorial(n)) for n in range(1, 60)) - 1.0
    assert w.XSTAR == pytest.approx(optimize.brentq(f, 0.1, 2.0, xtol=1e-15), abs=1e-13)


def test_thresholds_increase_with_k_and_grow_like_e_minus_1():
    xs = [w.threshold(k) for k in range(1, 401)]
    assert all(b > a for a, b in zip(xs, xs[1:]))          # monotone case needs this
    assert all(x > 1.5 for x in xs)
    excess = [x - (E - 1.0) * k for k, x in enumerate(xs, start=1)]
    assert 0.40 < excess[0] < 0.41                          # x_1 = 2.1198...
    assert all(0.085 < e < 0.41 for e in excess)
    assert abs(w.threshold(5000) - (E - 1.0) * 5000 - 0.089) < 2e-3
    # rule_value relies on x_k < (e-1) k + 0.5 over the whole range of arrival numbers
    for k in (1000, 10_000, 16_383, 16_384, 33_333, 60_000, 93_000):
        assert 0.085 < w.threshold(k) - (E - 1.0) * k < 0.41


def _order_statistics_value(k0: int, mu0: float):
    """(win, hire, interviews) of the threshold rule from "k0 seen, mu0 to come",
    by a different route than seqpick.window: condition on the number m of new
    arrivals; arrival i = k0 + j is active iff its time share U_(j) >= v_i =
    1 - x_i / mu0, so the first active index J has P(J <= i | m) =
    P(Bin(m, v_i) <= j - 1), and given J = i and n = k0 + m seen in all the rule
    wins with (i-1)/n (H_{n-1} - H_{i-2}) (1/n if i = 1), hires with
    (n - i + 1)/n and sees (i-1)(H_{n-1} - H_{i-2} + 1) (1 if i = 1); no active
    arrival: nothing won, n seen."""
    m_max = int(mu0 + 40 * math.sqrt(mu0) + 40)
    h = _hnum(k0 + m_max + 2)
    x = np.array([w.threshold(i) for i in range(k0 + 1, k0 + m_max + 1)])
    v = np.maximum(0.0, 1.0 - x / mu0)
    win = hire = seen = 0.0
    lp = -mu0 + np.arange(m_max + 1) * math.log(mu0) - np.array(
        [math.lgamma(m + 1.0) for m in range(m_max + 1)])
    for m in range(0, m_max + 1):
        pm = math.exp(lp[m])
        n = k0 + m
        if m == 0:
            seen += pm * n
            continue
        j = np.arange(1, m + 1)
        i = k0 + j
        g = stats.binom.cdf(j - 1, m, v[:m])
        pj = np.diff(np.concatenate([[0.0], g]))          # P(J = i | m)
        if k0 == 0:
            wi = np.where(i == 1, 1.0 / n, (i - 1) / n * (h[n - 1] - h[np.maximum(i - 2, 0)]))
            ei = np.where(i == 1, 1.0, (i - 1) * (h[n - 1] - h[np.maximum(i - 2, 0)] + 1.0))
        else:
            wi = (i - 1) / n * (h[n - 1] - h[i - 2])
            ei = (i - 1) * (h[n - 1] - h[i - 2] + 1.0)
        win += pm * float(np.sum(pj * wi))
        hire += pm * float(np.sum(pj * (n - i + 1) / n))
        seen += pm * (float(np.sum(pj * ei)) + (1.0 - g[-1]) * n)
    return win, hire, seen


@pytest.mark.parametrize("k0,mu0", [(0, 3.0), (0, 30.0), (0, 150.0), (1, 0.7), (3, 10.0),
                                    (20, 60.0), (20, 30.0), (40, 50.0), (60, 120.0)])
def test_rule_value_matches_order_statistics(k0, mu0):
    rv = w.rule_value(k0, mu0)
    win, hire, seen = _order_statistics_value(k0, mu0)
    assert rv.win == pytest.approx(win, abs=1e-12)
    assert rv.hire == pytest.approx(hire, abs=1e-12)
    assert rv.interviews == pytest.approx(seen, rel=1e-12)


@pytest.mark.parametrize("k0,mu0", [(0, 2500.0), (0, 20000.0), (700, 3000.0)])
def test_value_sums_from_fresh_chains_match_cached_states(k0, mu0):
    # a cold call takes the value sums from the chain steps that make the thresholds;
    # a warm call redoes the count moves from the cached triples
    w._clear_caches()
    cold = w.rule_value(k0, mu0)
    warm = w.rule_value(k0, mu0)
    assert cold.band == warm.band
    assert cold.win == pytest.approx(warm.win, abs=2e-15)
    assert cold.hire == pytest.approx(warm.hire, abs=1e-14)
    assert cold.interviews == pytest.approx(warm.interviews, rel=1e-14)


def test_stay_best_chance_matches_hypergeometric_function():
    # E[k/(k+M)] = 1F1(1; k+1; -mu)  (Kummer's integral)
    for k, mu in [(1, 0.3), (3, 2.5), (10, 17.2), (50, 80.0)]:
        assert w.stay_best_chance(k, mu) == pytest.approx(hyp1f1(1.0, k + 1.0, -mu), rel=1e-12)


def _ode_optimal_value(lam: float) -> float:
    """Continuous-time DP: U_k(y) = chance of winning from time y (in expected
    arrivals) with k seen and nobody taken, continuing optimally:
    dU_k/dy = U_k - [max(S_{k+1}, U_{k+1}) / (k+1) + k/(k+1) U_{k+1}], U_k(lam) = 0."""
    kmax = int(lam + 14 * math.sqrt(lam) + 40)
    k1 = np.arange(1, kmax + 2, dtype=float)

    def rhs(y, u):
        mu = lam - y
        nxt = np.append(u[1:], 0.0)
        stop = hyp1f1(1.0, k1 + 1.0, -mu)
        return u - (np.maximum(stop, nxt) / k1 + (k1 - 1.0) / k1 * nxt)

    sol = integrate.solve_ivp(rhs, (lam, 0.0), np.zeros(kmax + 1), method="LSODA",
                              rtol=1e-11, atol=1e-13)
    return float(sol.y[0, -1])


@pytest.mark.parametrize("lam", [0.5, 3.0, 10.0])
def test_optimal_value_matches_continuous_time_dp(lam):
    assert w.rule_value(0, lam).win == pytest.approx(_ode_optimal_value(lam), abs=1e-8)


def _simulate(lam: float, sims: int, seed: int, vshare) -> dict[str, np.ndarray]:
    """Simulate windows [0, 1] with Poisson(lam) arrivals; arrival i is active
    from share vshare[i-1] on; take the first active best-so-far."""
    rng = np.random.default_rng(seed)
    n = rng.poisson(lam, sims)
    width = int(n.max()) + 1
    idx = np.arange(width)
    valid = idx[None, :] < n[:, None]
    times = np.where(valid, rng.random((sims, width)), 2.0)
    times.sort(axis=1)
    q = np.where(valid, rng.random((sims, width)), -1.0)
    runmax = np.maximum.accumulate(q, axis=1)
    record = valid & (q >= runmax)
    thr = np.array([vshare(i + 1) for i in range(width)])
    active = times >= thr[None, :]
    take = record & active
    any_take = take.any(axis=1)
    first = np.argmax(take, axis=1)
    chosen = q[np.arange(sims), first]
    win = any_take & (chosen >= q.max(axis=1))
    seen = np.where(any_take, first + 1, n)
    return {"win": win.astype(float), "none": (~any_take).astype(float),
            "seen": seen.astype(float)}


def _check_4se(sample: np.ndarray, exact: float) -> None:
    se = sample.std(ddof=1) / math.sqrt(len(sample))
    assert abs(sample.mean() - exact) <= 4 * se + 1e-12


def test_optimal_rule_simulation():
    lam = 6.0
    res = _simulate(lam, 200_000, 12345, lambda i: max(0.0, 1.0 - w.threshold(i) / lam))
    rv = w.rule_value(0, lam)
    _check_4se(res["win"], rv.win)
    _check_4se(res["none"], 1.0 - rv.hire)
    _check_4se(res["seen"], rv.interviews)


def _records_brute(n: int):
    """For every order of n (rank 1 = best), the index (1-based) of each record."""
    for perm in itertools.permutations(range(n)):
        best = -1
        recs = []
        for pos, val in enumerate(perm, start=1):
            if val > best:
                best = val
                recs.append(pos)
        yield perm, recs


def _brute_fixed_n(n: int):
    """(first record from index i is the last record) counts for every i, by enumeration."""
    wins = [0] * (n + 2)
    none = [0] * (n + 2)
    seen = [0] * (n + 2)
    total = math.factorial(n)
    for perm, recs in _records_brute(n):
        for i in range(1, n + 2):
            later = [r for r in recs if r >= i]
            if not later:
                none[i] += 1
                seen[i] += n
            else:
                seen[i] += later[0]
                if later[0] == recs[-1]:
                    wins[i] += 1
    return ([c / total for c in wins], [c / total for c in none], [c / total for c in seen])


@pytest.fixture(scope="module")
def brute_tables():
    return {n: _brute_fixed_n(n) for n in range(1, 9)}


def test_clock_rule_matches_enumeration(brute_tables):
    lam = 0.25            # P(N > 8) < 2e-11
    for x in (0.0, 0.2, 1.0 / E, 0.7):
        win = none = seen = 0.0
        none += stats.poisson.pmf(0, lam)
        for n in range(1, 9):
            pn = stats.poisson.pmf(n, lam)
            wins, nones, seens = brute_tables[n]
            for j in range(0, n + 1):           # j arrivals before the share x
                pj = stats.binom.pmf(j, n, x)
                win += pn * pj * wins[j + 1]
                none += pn * pj * nones[j + 1]
                seen += pn * pj * (seens[j + 1])
        v = w.clock_rule(x, lam)
        assert v.win == pytest.approx(win, abs=1e-10)
        assert v.none == pytest.approx(none, abs=1e-10)
        assert v.interviews == pytest.approx(seen, abs=1e-10)


def test_skip_rule_matches_enumeration(brute_tables):
    lam = 0.25
    for r in (0, 1, 2, 3):
        win = 0.0
        for n in range(r + 1, 9):
            win += stats.poisson.pmf(n, lam) * brute_tables[n][0][r + 1]
        assert w.skip_rule(r, lam).win == pytest.approx(win, abs=1e-10)


@pytest.mark.parametrize("lam,x", [(4.0, 0.3), (25.0, 1.0 / E), (60.0, 0.5), (200.0, 0.05)])
def test_clock_rule_matches_quadrature(lam, x):
    # quality picture: V = 1 - (best quality before xT) has density a e^{-a v} on (0,1)
    # plus an atom e^{-a} at 1; then P(win | V=v) = psi((1-x) lam v), psi(c) = E[1/M; M>=1].
    a, b = x * lam, (1 - x) * lam

    def psi(c):
        m = np.arange(1, int(c + 40 * math.sqrt(c) + 60))
        return float(np.sum(stats.poisson.pmf(m, c) / m))

    val, _ = integrate.quad(lambda v: a * math.exp(-a * v) * psi(b * v), 0.0, 1.0,
                            epsabs=1e-13, epsrel=1e-12, limit=200)
    assert w.clock_rule(x, lam).win == pytest.approx(val + math.exp(-a) * psi(b), abs=1e-9)


def _clock_win_series(x: float, lam: float) -> float:
    """The series form x E[L_{M-1}(1-x)] + e^{-x lam} psi((1-x) lam), summed term by term."""
    q = 1.0 - x
    m = np.arange(0, int(lam + 40 * math.sqrt(lam) + 60))
    pm = stats.poisson.pmf(m, lam)
    n = np.arange(1, len(m))
    lj = np.concatenate([[0.0], np.cumsum(q ** n / n)])         # L_0 .. L_{len-1}
    series = float(np.sum(pm[1:] * lj[m[1:] - 1]))
    b = q * lam
    mb = np.arange(1, int(b + 40 * math.sqrt(b) + 60))
    psi = float(np.sum(stats.poisson.pmf(mb, b) / mb)) if b > 0 else 0.0
    return x * series + math.exp(-x * lam) * psi


@pytest.mark.parametrize("lam", [0.05, 1.0, 7.0, 60.0, 400.0])
def test_clock_closed_form_matches_the_series(lam):
    for x in (0.0, 1e-4, 0.01, 0.2, 1.0 / E, 0.75, 0.999):
        assert w.clock_rule(x, lam).win == pytest.approx(_clock_win_series(x, lam), abs=1e-13)


@pytest.mark.parametrize("lam", [5.0, 44.0, 100.0, 2500.0, 30000.0])
def test_curve_matches_pointwise_clock_rule(lam):
    _, _, curve = w._best_clock(lam)
    for i in range(0, 1000, 37):
        assert curve[i] == pytest.approx(w.clock_rule(i / 1000, lam).win, abs=1e-15)


def test_psi_grid_matches_high_precision():
    mp = pytest.importorskip("mpmath")
    mp.mp.dps = 30
    for lam in (44.0, 1000.0, 40000.0):
        n = min(1000, int(51000 / lam) + 1)
        grid = w._psi_grid(lam, n)
        for i in range(0, n, max(1, n // 7)):
            b = mp.mpf(lam) - i * mp.mpf(lam) / 1000
            ref = mp.e ** (-b) * (mp.ei(b) - mp.euler - mp.log(b))
            assert grid[i] == pytest.approx(float(ref), rel=1e-14)


def test_bruss_one_over_e_law():
    x = 1.0 / E
    h = _hnum(700)
    for n in range(1, 301):
        j = np.arange(1, n)
        a = j / n * (h[n - 1] - h[j - 1])         # first best-so-far after j arrivals
        p = stats.binom.pmf(0, n, x) / n + float(np.sum(stats.binom.pmf(j, n, x) * a))
        assert p >= 1.0 / E - 1e-12, n
    for lam in (0.01, 0.3, 1.0, 2.0, 5.0, 20.0, 100.0, 1000.0):
        assert w.clock_rule(x, lam).win >= (1.0 - math.exp(-lam)) / E - 1e-13


def test_limit_one_over_e():
    # Cowan & Zabczyk 1978: the optimal chance tends to 1/e; at L T = 2000 it is
    # within 2e-4 of it (observed 1/e + 4e-5), and above the clock rule.
    rv = w.rule_value(0, 2000.0)
    assert abs(rv.win - 1.0 / E) < 2e-4
    assert rv.win > w.clock_rule(1.0 / E, 2000.0).win
    assert abs(w.clock_rule(1.0 / E, 2000.0).win - 1.0 / E) < 1e-12


def _scenario(**pool):
    base = {"window": 2.0, "arrivals_per_unit": 3.0}
    base.update(pool)
    return {"pool": base}


def test_advice_follows_the_plan_at_every_time():
    sc = _scenario()
    lam = 6.0
    for k in range(1, 8):
        xk = w.threshold(k)
        for t in np.linspace(0.0, 2.0, 41):
            mu = 3.0 * (2.0 - t)
            if abs(mu - xk) < 1e-6:
                continue
            seen = ([{"relative_rank": 1 if i == 0 else 2, "time": 0.0} for i in range(k - 1)]
                    + [{"relative_rank": 1, "time": float(t)}])
            a = advise(sc, seen)
            assert a.decision == ("offer" if mu <= xk else "pass")
            assert a.plan_decision == a.decision
            if abs(a.offer_value - a.pass_value) > 1e-9:
                assert (a.offer_value > a.pass_value) == (a.decision == "offer")
            assert a.offer_value == pytest.approx(w.stay_best_chance(k, mu), abs=1e-15)
    # pass value from the very start equals the plan's value
    a = advise(sc, [{"relative_rank": 1, "time": 0.0}])
    assert a.decision == "pass"
    assert 0.0 <= a.pass_value <= w.rule_value(0, lam).win + 1e-12


def test_advice_not_best_so_far_passes():
    a = advise(_scenario(), [{"relative_rank": 1, "time": 0.5}, {"relative_rank": 2,
                                                                  "time": 1.9}])
    assert a.decision == "pass" and a.offer_value == 0.0
    assert "cannot be the best" in a.reason


def test_date_words():
    sc = _scenario(window=10, arrivals_per_unit=3, start="2026-03-02T09:00", unit="day")
    r = solve(sc)
    x = r.policy.start_share
    when = dt.datetime(2026, 3, 2, 9, 0) + dt.timedelta(days=10 * x, seconds=30)
    text = f"{when.day} March {when:%H:%M}"
    assert f"after {text}, make an offer to the first candidate better" in r.policy.words
    assert r.policy.start_time == pytest.approx(10 * x)
    # months are 30.4375 days
    sc = _scenario(window=2, arrivals_per_unit=10, start="2026-01-01T00:00", unit="month")
    r = solve(sc)
    when = (dt.datetime(2026, 1, 1) + dt.timedelta(days=30.4375 * 2 * r.policy.start_share,
                                                  seconds=30))
    assert f"{when.day} {when:%B} {when:%H:%M}" in r.policy.words
    a = advise({"pool": {"window": 10, "arrivals_per_unit": 3, "start": "2026-03-02T09:00",
                         "unit": "day"}}, [{"relative_rank": 1, "time": 9.5}])
    assert "11 March 21:00" in a.reason


def test_solve_result_fields():
    r = solve({"pool": {"window": 10, "arrivals_per_unit": 3},
               "compare": [{"start_share": 0.3}, {"skip": 11}, {"skip_share": 0.37}]})
    assert r.policy.thresholds == [] and r.policy.groups == []
    tt = r.policy.time_thresholds
    keys = sorted(int(k) for k in tt)
    assert keys[0] == 1
    times = [tt[str(k)] for k in keys]
    assert all(b <= a for a, b in zip(times, times[1:]))     # later arrivals: earlier
    assert times[0] == pytest.approx(10 - w.threshold(1) / 3)
    assert r.outcome.forced_last == 0.0
    total = r.outcome.best + r.outcome.other + r.outcome.none + r.outcome.forced_last
    assert total == pytest.approx(1.0, abs=1e-12)
    assert r.success_probability == pytest.approx(_ode_optimal_value(30.0), abs=1e-7)
    assert len(r.curve.skips) == 1000 and r.curve.skips[0] == 0
    assert r.curve.limit[500] == pytest.approx(-0.5 * math.log(0.5))
    assert r.compare[2].success_probability == r.compare[1].success_probability  # floor(0.37*30)=11
    for c in r.compare:
        assert c.success_probability <= r.success_probability + 1e-12
    assert r.rank_distribution is None and r.top is None
    assert any(l.value == pytest.approx(1 / E) for l in r.limits)


@pytest.mark.parametrize("extra,field", [
    ({"must_hire": True}, "must_hire"),
    ({"openings": 2}, "openings"),
    ({"goal": {"type": "top", "k": 2}}, "goal.type"),
    ({"goal": {"type": "rank"}, "must_hire": False}, "goal.type"),
    ({"accept_probability": 0.5}, "accept_probability"),
    ({"cost_per_candidate": 0.01}, "cost_per_candidate"),
    ({"compare": [{"skip": 1}, {"score_at_least": 3}]}, "compare.1.score_at_least"),
])
def test_refusals_name_the_field(extra, field):
    sc = _scenario()
    sc.update(extra)
    with pytest.raises(ScenarioError) as e:
        solve(sc)
    assert e.value.field == field


def test_bad_start_is_refused():
    with pytest.raises(ScenarioError) as e:
        solve(_scenario(start="next Tuesday", unit="day"))
    assert e.value.field == "pool.start"


@settings(max_examples=15, deadline=None)
@given(lam=st.floats(0.01, 40.0), shares=st.lists(st.floats(0.0, 0.999), min_size=1,
                                                 max_size=3),
       skip=st.integers(0, 60))
def test_properties(lam, shares, skip):
    r = solve({"pool": {"window": 1.0, "arrivals_per_unit": lam},
               "compare": [{"start_share": x} for x in shares] + [{"skip": skip}]})
    for res in [r] + list(r.compare):
        o = res.outcome
        for v in (o.best, o.other, o.none, o.forced_last, res.p_no_hire):
            assert 0.0 <= v <= 1.0
        assert o.best + o.other + o.none + o.forced_last == pytest.approx(1.0, abs=1e-12)
        assert res.expected_interviews <= lam + 1e-9
    for c in r.compare:
        assert c.success_probability <= r.success_probability + 1e-12
    assert all(0.0 <= s <= 1.0 for s in r.curve.success)


def test_tiny_and_extreme_shares_terminate():
    # subnormal shares once made a series loop spin (the stop test underflowed to 0)
    for x in (5e-324, 1e-300, 1e-17, 0.999999):
        v = w.clock_rule(x, 3.0)
        assert 0.0 <= v.win <= 1.0 and 0.0 <= v.none <= 1.0
    assert w.clock_rule(5e-324, 3.0).win == pytest.approx(w.clock_rule(0.0, 3.0).win)
    assert w.ein(5e-324) == 5e-324
