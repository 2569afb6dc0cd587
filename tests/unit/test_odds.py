"""The odds theorem (stop on the last event): independent checks of seqpick.odds.

Independent checks: brute-force enumeration of all 2^N event patterns (and
3^N event/accept/decline patterns), with the optimum over *all* stopping
rules found by backward induction over histories (not stages); exact
rational arithmetic for the classic case.

Published values
----------------
Bruss, F. T. (2000). Sum the odds to one and stop. Ann. Probab. 28,
1384-1391: the odds algorithm is optimal; win chance Q_s R_s.
Bruss, F. T. (2003). A note on bounds for the odds theorem of optimal
stopping. Ann. Probab. 31, 1859-1861: the win chance is at least 1/e when
the odds sum to at least 1 (from memory; checked here as a property).
Ferguson, T. S. (1989). Who solved the secretary problem? Statistical
Science 4, 282-296: with p_k = 1/k (k-th candidate best so far) the problem
is the classic one; N = 100: pass on 37, win 0.371042... (value from memory,
confirmed below with exact fractions).
"""

from __future__ import annotations

import itertools
import math
import random
from fractions import Fraction
from functools import lru_cache

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from seqpick import ScenarioError, advise, solve
from seqpick import odds


def _patterns(p):
    for pat in itertools.product((0, 1), repeat=len(p)):
        pr = 1.0
        for e, pk in zip(pat, p):
            pr *= pk if e else 1.0 - pk
        yield pat, pr


def _brute_rule_win(p, start):
    """Win chance of "offer at the first event from stage `start` on", by enumeration."""
    win = 0.0
    for pat, pr in _patterns(p):
        events = [k for k, e in enumerate(pat, start=1) if e]
        take = next((k for k in events if k >= start), None)
        if take is not None and take == events[-1]:
            win += pr
    return win


def _brute_optimum(p, q=1.0, c=0.0):
    """Optimal value over all history-dependent rules: backward induction over
    histories, stage outcomes 0 (no event), 1 (event, would accept), 2 (event,
    would decline; only seen if an offer is made -- a decline leaves the
    history as it would be after a pass).  Stop values by enumerating the future."""
    n = len(p)

    def no_later_event(k):
        tot = 0.0
        for pat, pr in _patterns(p[k:]):
            if not any(pat):
                tot += pr
        return tot

    @lru_cache(maxsize=None)
    def value(hist):
        k = len(hist)
        if k == n:
            return 0.0
        pk = p[k]
        cont_no = value(hist + (0,))
        cont_ev = value(hist + (1,))
        offer = q * no_later_event(k + 1) + (1.0 - q) * cont_ev
        return -c + (1.0 - pk) * cont_no + pk * max(offer, cont_ev)

    return value(())


@pytest.mark.parametrize("seed", range(8))
def test_odds_rule_is_optimal_by_brute_force(seed):
    rng = random.Random(seed)
    n = rng.randint(1, 10)
    p = [rng.choice([rng.random(), rng.random() ** 3, 0.0, 1.0 if rng.random() < 0.1 else 0.5])
         for _ in range(n)]
    r = solve({"pool": {"chances": p}})
    s_idx = r.policy.skip + 1
    assert r.success_probability == pytest.approx(_brute_rule_win(p, s_idx), abs=1e-12)
    assert r.success_probability == pytest.approx(_brute_optimum(p), abs=1e-12)
    # the curve is the win chance of every start stage
    for skip, val in zip(r.curve.skips, r.curve.success):
        assert val == pytest.approx(_brute_rule_win(p, skip + 1), abs=1e-12)
    assert r.curve.complete


@pytest.mark.parametrize("seed", range(6))
def test_declines_and_costs_match_brute_force(seed):
    rng = random.Random(100 + seed)
    n = rng.randint(1, 8)
    p = [rng.random() for _ in range(n)]
    q = rng.choice([0.3, 0.7, 1.0])
    c = rng.choice([0.0, 0.01, 0.05])
    r = solve({"pool": {"chances": p}, "accept_probability": q, "cost_per_candidate": c})
    net = r.success_probability - r.expected_cost
    assert net == pytest.approx(_brute_optimum(p, q, c), abs=1e-12)
    assert r.expected_cost == pytest.approx(c * r.expected_interviews)


def test_classic_equivalence_exact():
    n = 100
    r = solve({"pool": {"chances": [1.0 / k for k in range(1, n + 1)]}})
    assert r.policy.skip == 37
    exact = Fraction(37, n) * sum(Fraction(1, k) for k in range(37, n))
    assert r.success_probability == pytest.approx(float(exact), abs=1e-14)
    assert round(r.success_probability, 6) == 0.371043   # 0.3710428 (Ferguson 1989)
    for n in (1, 2, 3, 5, 10, 37, 60):
        r = solve({"pool": {"chances": [1.0 / k for k in range(1, n + 1)]}})
        s = r.policy.skip
        want = Fraction(1, n) if s == 0 else Fraction(s, n) * sum(Fraction(1, k)
                                                                  for k in range(s, n))
        best = max([Fraction(1, n)] + [Fraction(t, n) * sum(Fraction(1, k) for k in range(t, n))
                                       for t in range(1, n)])
        assert r.success_probability == pytest.approx(float(want), abs=1e-14)
        assert want == best


def test_certain_events():
    r = solve({"pool": {"chances": [0.3, 1.0, 0.2]}})
    assert r.policy.skip == 1 and r.policy.thresholds == [0, 1, 1]
    assert r.success_probability == pytest.approx(0.8)
    r = solve({"pool": {"chances": [0.5, 0.4, 1.0]}})
    assert r.policy.skip == 2 and r.success_probability == pytest.approx(1.0)
    r = solve({"pool": {"chances": [1.0, 1.0, 1.0]}})
    assert r.policy.skip == 2 and r.success_probability == 1.0
    assert odds.odds_start([1.0, 0.9, 0.2]) == (2, pytest.approx(9.25))


def test_small_odds_start_at_stage_one():
    p = [0.1, 0.2, 0.15]
    s_idx, total = odds.odds_start(p)
    assert s_idx == 1 and total < 1
    r = solve({"pool": {"chances": p}})
    q = math.prod(1 - x for x in p)
    rsum = sum(x / (1 - x) for x in p)
    assert r.success_probability == pytest.approx(q * rsum, abs=1e-15)
    assert r.outcome.none == pytest.approx(q)
    assert r.limits == []                       # the 1/e bound needs odds summing to 1


def test_outputs_and_must_hire():
    p = [0.2, 0.5, 0.3, 0.1, 0.05]
    r = solve({"pool": {"chances": p}, "compare": [{"skip": 0}, {"skip_share": 0.5}]})
    assert r.top is None and r.rank_distribution is None and r.expected_rank is None
    assert r.policy.thresholds == [0] * r.policy.skip + [1] * (5 - r.policy.skip)
    assert r.compare[1].rule == {"skip_share": 0.5}
    assert r.compare[1].success_probability == pytest.approx(_brute_rule_win(p, 3))
    # expected interviews by enumeration
    s_idx = r.policy.skip + 1
    seen = 0.0
    for pat, pr in _patterns(p):
        take = next((k for k, e in enumerate(pat, start=1) if e and k >= s_idx), None)
        seen += pr * (take if take is not None else len(p))
    assert r.expected_interviews == pytest.approx(seen)
    m = solve({"pool": {"chances": p}, "must_hire": True})
    assert m.success_probability == pytest.approx(r.success_probability)
    assert m.outcome.none == 0.0
    assert m.outcome.forced_last == pytest.approx(r.outcome.none)
    assert "take the last stage" in m.policy.words


@pytest.mark.parametrize("extra,field", [
    ({"openings": 2}, "openings"),
    ({"goal": {"type": "top", "k": 1}}, "goal.type"),
    ({"compare": [{"start_share": 0.3}]}, "compare.0.start_share"),
    ({"compare": [{"skip": 1}, {"score_at_least": 2}]}, "compare.1.score_at_least"),
    ({"compare": [{"skip": 3}]}, "compare.0.skip"),
])
def test_refusals_name_the_field(extra, field):
    sc = {"pool": {"chances": [0.5, 0.5, 0.5]}}
    sc.update(extra)
    with pytest.raises(ScenarioError) as e:
        solve(sc)
    assert e.value.field == field


def test_advice_follows_the_plan():
    p = [1.0 / k for k in range(1, 11)]
    sc = {"pool": {"chances": p}}
    r = solve(sc)
    for k in range(1, 11):
        for event in (True, False):
            if k == 1 and not event:
                continue        # parse_seen: the first candidate always has relative rank 1
            seen = [{"relative_rank": 1}] * (k - 1) + [{"relative_rank": 1 if event else 2}]
            a = advise(sc, seen)
            plan = "offer" if event and k > r.policy.skip else "pass"
            assert a.decision == plan
            zk = math.prod(1 - x for x in p[k:])
            assert a.offer_value == pytest.approx(zk if event else 0.0)
            want = _brute_rule_win(p, max(k + 1, r.policy.skip + 1)) if k < 10 else 0.0
            assert a.pass_value == pytest.approx(want, abs=1e-12)


def test_large_pool_curve_is_sampled():
    p = [1.0 / k for k in range(1, 5001)]
    r = solve({"pool": {"chances": p}})
    assert not r.curve.complete and r.policy.skip in r.curve.skips
    assert 990 <= len(r.curve.skips) <= 1001
    i = r.curve.skips.index(r.policy.skip)
    assert r.curve.success[i] == pytest.approx(r.success_probability)
    assert max(r.curve.success) <= r.success_probability + 1e-14


@settings(max_examples=60, deadline=None)
@given(p=st.lists(st.floats(0.0, 1.0), min_size=1, max_size=40),
       q=st.sampled_from([1.0, 0.5, 0.9]), must=st.booleans(),
       skips=st.lists(st.integers(0, 39), max_size=3))
def test_properties(p, q, must, skips):
    n = len(p)
    cmp = [{"skip": min(s, n - 1)} for s in skips]
    r = solve({"pool": {"chances": p}, "accept_probability": q, "must_hire": must,
               "compare": cmp})
    for res in [r] + list(r.compare):
        o = res.outcome
        for v in (o.best, o.other, o.none, o.forced_last, res.p_no_hire):
            assert 0.0 <= v <= 1.0
        assert o.best + o.other + o.none + o.forced_last == pytest.approx(1.0, abs=1e-12)
        assert 0.0 <= res.expected_interviews <= n + 1e-9
    for c in r.compare:
        assert c.success_probability <= r.success_probability + 1e-12
    assert all(v <= r.success_probability + 1e-12 for v in r.curve.success)
    total_odds = sum(x / (1 - x) if x < 1 else math.inf for x in p)
    if q == 1.0 and total_odds >= 1.0:
        assert r.success_probability >= 1.0 / math.e - 1e-12   # Bruss 2003 lower bound


# --- the "event" field of live advice ------------------------------------------------

def _seen_events(events):
    return [{"event": e} for e in events]


def test_event_field_matches_relative_rank_and_brute_force():
    p = [1.0 / k for k in range(1, 11)]
    sc = {"pool": {"chances": p}}
    r = solve(sc)
    for k in range(1, 11):
        for event in (True, False):
            a = advise(sc, _seen_events([True] * (k - 1) + [event]))
            plan = "offer" if event and k > r.policy.skip else "pass"
            assert a.decision == plan
            zk = math.prod(1 - x for x in p[k:])
            assert a.offer_value == pytest.approx(zk if event else 0.0, abs=1e-15)
            want = _brute_rule_win(p, max(k + 1, r.policy.skip + 1)) if k < 10 else 0.0
            assert a.pass_value == pytest.approx(want, abs=1e-12)
            if k > 1 or event:      # the same advice through relative_rank
                b = advise(sc, [{"relative_rank": 1}] * (k - 1)
                           + [{"relative_rank": 1 if event else 2}])
                assert (b.decision, b.offer_value, b.pass_value) == \
                    (a.decision, a.offer_value, a.pass_value)


def test_first_stage_without_event():
    # relative_rank can only say 1 at the first stage; event can say "no event"
    p = [0.5, 0.2, 0.9]
    a = advise({"pool": {"chances": p}}, [{"event": False}])
    assert a.decision == "pass" and a.offer_value == 0.0
    assert a.pass_value == pytest.approx(_brute_optimum(p[1:]), abs=1e-12)
    both = advise({"pool": {"chances": p}}, [{"event": True, "relative_rank": 1},
                                            {"event": False, "relative_rank": 2}])
    assert both.decision == "pass"


@pytest.mark.parametrize("seed", range(4))
def test_event_advice_with_declines_and_cost_matches_brute_force(seed):
    rng = random.Random(300 + seed)
    n = rng.randint(2, 7)
    p = [rng.random() for _ in range(n)]
    q = rng.choice([0.4, 0.8])
    c = rng.choice([0.0, 0.02])
    sc = {"pool": {"chances": p}, "accept_probability": q, "cost_per_candidate": c}
    for k in range(1, n + 1):
        for event in (True, False):
            a = advise(sc, _seen_events([False] * (k - 1) + [event]))
            later = _brute_optimum(p[k:], q, c) if k < n else 0.0   # stages are independent
            assert a.pass_value == pytest.approx(later, abs=1e-12)
            zk = math.prod(1 - x for x in p[k:])
            offer = (q * zk if event else 0.0) + (1 - q) * later
            assert a.offer_value == pytest.approx(offer, abs=1e-12)
            if abs(offer - later) > 1e-9:
                assert (a.decision == "offer") == (event and offer > later)


@pytest.mark.parametrize("seen,field", [
    ([{"event": 1}], "seen.0.event"),
    ([{"event": "yes"}], "seen.0.event"),
    ([{"event": True}, {"label": "B"}], "seen.1.event"),
    ([{"event": True}, {"event": True, "relative_rank": 2}], "seen.1.event"),
    ([{"event": False, "relative_rank": 1}], "seen.0.event"),
])
def test_event_field_is_validated(seen, field):
    with pytest.raises(ScenarioError) as e:
        advise({"pool": {"chances": [0.5, 0.5, 0.5]}}, seen)
    assert e.value.field == field


def test_event_field_only_for_chances():
    with pytest.raises(ScenarioError) as e:
        advise({"pool": {"size": 5}}, [{"relative_rank": 1, "event": True}])
    assert e.value.field == "seen.0.event"
    assert "unknown field" in e.value.message


# --- the running-product evaluations against the stage-by-stage recursions ---------

def _loop_rule(p, start, q, must):
    """Stage-by-stage evaluation of "offer at the first event from stage `start` on"."""
    n = len(p)
    z = [1.0] * (n + 2)
    for k in range(n, 0, -1):
        z[k] = (1 - p[k - 1]) * z[k + 1]
    alive, win, other, forced, seen = 1.0, 0.0, 0.0, 0.0, 0.0
    for k in range(1, n + 1):
        seen += alive
        pk = p[k - 1]
        if must and k == n:
            win += alive * pk * q
            forced += alive * (1 - pk) * q
            alive *= 1 - q
        elif k >= start:
            hire = alive * pk * q
            win += hire * z[k + 1]
            other += hire * (1 - z[k + 1])
            alive -= hire
    return win, other, alive, forced, seen


@pytest.mark.parametrize("seed", range(3))
def test_vectorised_paths_match_the_recursions(seed):
    rng = random.Random(700 + seed)
    n = 3000 + 500 * seed
    p = [rng.random() ** 4 for _ in range(n)]
    if seed == 1:
        p[17] = 1.0               # one certain stage early on
    if seed == 2:
        p[n // 2] = 0.0
    for q, must in ((1.0, False), (1.0, True), (0.6, False), (0.6, True)):
        r = solve({"pool": {"chances": p}, "accept_probability": q, "must_hire": must,
                   "compare": [{"skip": 0}, {"skip": n // 3}]})
        w = odds.suffix_tables(p, q).w
        for skip, val in zip(r.curve.skips, r.curve.success):
            assert val == pytest.approx(w[skip + 1], abs=1e-13)
        start = r.policy.skip + 1 if r.policy.skip is not None else None
        for res, st in [(r, start), (r.compare[0], 1), (r.compare[1], n // 3 + 1)]:
            if st is None:
                continue
            win, other, none, forced, seen = _loop_rule(p, st, q, must)
            assert res.success_probability == pytest.approx(win, abs=1e-13)
            assert res.outcome.other == pytest.approx(other, abs=1e-13)
            assert res.outcome.none == pytest.approx(none, abs=1e-13)
            assert res.outcome.forced_last == pytest.approx(forced, abs=1e-13)
            assert res.expected_interviews == pytest.approx(seen, rel=1e-13)
    s_idx, total = odds.odds_start(p)
    ref_total, ref_s = 0.0, 1
    for k in range(n, 0, -1):
        if p[k - 1] >= 1.0:
            ref_s, ref_total = k, math.inf
            break
        ref_total += p[k - 1] / (1 - p[k - 1])
        if ref_total >= 1.0:
            ref_s = k
            break
    assert (s_idx, total) == (ref_s, ref_total)


def test_two_certain_stages():
    # with two certain events from s on, W_s = 0; after the second one, the usual sum
    p = [0.3, 1.0, 0.2, 1.0, 0.1, 0.4]
    r = solve({"pool": {"chances": p}})
    for skip, val in zip(r.curve.skips, r.curve.success):
        assert val == pytest.approx(_brute_rule_win(p, skip + 1), abs=1e-15)
    assert r.policy.skip == 3 and r.success_probability == pytest.approx(0.9 * 0.6)
