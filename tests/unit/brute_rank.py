"""Brute force for the relative-rank engine: every order, every history.

Independent of :mod:`seqpick.rankdp` (no shared code, no Markov-chain
shortcut): for each pool size n it enumerates all n! orders (as
relative-rank sequences j_1..j_n, j_i in 1..i, each with chance
prior[n] / n!), converts each to absolute ranks by insertion, and

* :class:`Brute` optimises over *every* policy by backward induction over the
  tree of observed histories (relative ranks so far, who was hired, openings
  left); an offer is accepted with chance p (a decline branches); with an
  uncertain pool the tree is shared across sizes, so a decision cannot depend
  on n; must_hire forces an offer to the last candidate of a known-size pool
  when nobody has been hired;
* :func:`evaluate` plays a given threshold rule on every order, branching on
  accept/decline, and returns its exact outcome.

Objective: P(goal met) - c * E[seen] for goals best/top (best: the overall
best is among the hires; top: some hire is among the best k), and
E[rank of the hire] + c * E[seen] for goal rank (no hire = rank n + 1).
Sums use math.fsum so that the brute force itself is accurate to ~1e-16.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field
from functools import lru_cache


def abs_ranks(seq: tuple[int, ...]) -> tuple[int, ...]:
    """Absolute ranks (1 = best) of a relative-rank sequence."""
    order: list[int] = []
    for idx, j in enumerate(seq):
        order.insert(j - 1, idx)
    ranks = [0] * len(seq)
    for pos, idx in enumerate(order):
        ranks[idx] = pos + 1
    return tuple(ranks)


def extensions(prefix: tuple[int, ...], n: int):
    i = len(prefix)
    for tail in itertools.product(*[range(1, a + 1) for a in range(i + 1, n + 1)]):
        yield prefix + tail


def goal_value(goal: str, k: int, ranks: tuple[int, ...], hires: tuple[int, ...]) -> float:
    n = len(ranks)
    hired = [ranks[h - 1] for h in hires]
    if goal == "best":
        return 1.0 if 1 in hired else 0.0
    if goal == "top":
        return 1.0 if any(a <= k for a in hired) else 0.0
    return float(min(hired)) if hired else float(n + 1)


class Brute:
    """Optimal play over the history tree (values are probability masses)."""

    def __init__(self, prior: list[float], goal: str, k: int = 1, p: float = 1.0,
                 m: int = 1, c: float = 0.0, must_hire: bool = False) -> None:
        self.prior, self.goal, self.k, self.p, self.m, self.c = prior, goal, k, p, m, c
        self.M = len(prior) - 1
        self.sign = -1.0 if goal == "rank" else 1.0
        support = [n for n, w in enumerate(prior) if w > 0]
        self.known = support[0] if (len(support) == 1 and must_hire) else None
        self.after = lru_cache(maxsize=None)(self._after)
        self.decide = lru_cache(maxsize=None)(self._decide)

    def pay(self, ranks, hires, seen) -> float:
        g = goal_value(self.goal, self.k, ranks, hires)
        return g - self.c * seen if self.sign > 0 else -(g + self.c * seen)

    def _after(self, prefix, hires, left) -> float:
        """Mass-weighted value after the decision on candidate len(prefix)."""
        i = len(prefix)
        terms = []
        if left == 0:
            for n in range(i, self.M + 1):
                if self.prior[n] == 0:
                    continue
                w = self.prior[n] / math.factorial(n)
                terms.extend(w * self.pay(abs_ranks(full), hires, i)
                             for full in extensions(prefix, n))
            return math.fsum(terms)
        if self.prior[i] > 0:
            terms.append(self.prior[i] / math.factorial(i)
                         * self.pay(abs_ranks(prefix), hires, i))
        if i < self.M:
            terms.extend(self.decide(prefix + (j,), hires, left) for j in range(1, i + 2))
        return math.fsum(terms)

    def offer_pass(self, prefix, hires, left) -> tuple[float, float]:
        i = len(prefix)
        pas = self.after(prefix, hires, left)
        off = self.p * self.after(prefix, hires + (i,), left - 1) + (1 - self.p) * pas
        return off, pas

    def _decide(self, prefix, hires, left) -> float:
        off, pas = self.offer_pass(prefix, hires, left)
        if self.known is not None and len(prefix) == self.known and not hires:
            return off
        return max(pas, off)

    def value(self) -> float:
        """The optimal objective (max for best/top, min for rank)."""
        return self.sign * self.after((), (), self.m)

    def advice_values(self, prefix: tuple[int, ...], left: int) -> tuple[float, float]:
        """(offer, pass) values at the newest candidate of ``prefix`` (no hires yet),
        conditional on the history, counting future costs only."""
        i = len(prefix)
        surv = math.fsum(self.prior[i:])
        mass = surv / math.factorial(i)
        off, pas = self.offer_pass(prefix, (), left)
        sunk = self.c * i
        # remove the cost already paid for the i candidates seen
        return (self.sign * (off / mass + sunk), self.sign * (pas / mass + sunk))


def optimal_value(prior: list[float], goal: str, k: int = 1, p: float = 1.0,
                  m: int = 1, c: float = 0.0, must_hire: bool = False) -> float:
    """Best achievable objective over all policies (max, or min for goal rank)."""
    return Brute(prior, goal, k, p, m, c, must_hire).value()


class _Acc:
    def __init__(self) -> None:
        self.terms: list[float] = []

    def add(self, v: float) -> None:
        self.terms.append(v)

    @property
    def total(self) -> float:
        return math.fsum(self.terms)


@dataclass
class Evaluation:
    objective: float = 0.0
    success: float = 0.0          # goal met (any hire, incl. forced)
    best: float = 0.0             # goal met by a regular offer (rank: hired the best)
    other: float = 0.0
    none: float = 0.0
    forced: float = 0.0
    interviews: float = 0.0
    hires: float = 0.0
    rank_sum: float = 0.0         # sum P * rank of the best hire (hires only)
    rank_dist: dict[int, float] = field(default_factory=dict)
    top: dict[str, float] = field(default_factory=dict)


def evaluate(prior: list[float], goal: str, thresholds: dict[int, list[int]], k: int = 1,
             p: float = 1.0, m: int = 1, c: float = 0.0,
             must_hire: bool = False) -> Evaluation:
    """Exact outcome of a threshold rule; thresholds[l][i-1] for l openings left."""
    M = len(prior) - 1
    support = [n for n, w in enumerate(prior) if w > 0]
    known = support[0] if len(support) == 1 else None
    acc: dict[str, _Acc] = {}
    shares = (0.10, 0.25, 0.50)

    def put(key, v):
        acc.setdefault(key, _Acc()).add(v)

    def finish(ranks, hires, seen, forced, w):
        n = len(ranks)
        g = goal_value(goal, k, ranks, hires)
        put("objective", w * (g + c * seen) if goal == "rank" else w * (g - c * seen))
        put("interviews", w * seen)
        put("hires", w * len(hires))
        if not hires:
            put("none", w)
            return
        best_rank = min(ranks[h - 1] for h in hires)
        met = best_rank == 1 if goal == "rank" else g == 1.0
        if goal != "rank" and met:
            put("success", w)
        put("rank_sum", w * best_rank)
        put(("dist", best_rank), w)
        for K in (1, 2, 3, 5, 10):
            if best_rank <= K:
                put(("top", str(K)), w)
        for sh in shares:
            if best_rank <= max(1, int(math.floor(sh * n))):
                put(("top", f"{round(sh * 100)}%"), w)
        put("forced" if forced else "best" if met else "other", w)

    def play(ranks, seq, i, hires, left, w):
        # about to see candidate i (1-based) with `left` openings
        n = len(ranks)
        if i > n or left == 0:
            finish(ranks, hires, i - 1, False, w)
            return
        j = seq[i - 1]
        t = thresholds[left][i - 1]
        forced = must_hire and known is not None and i == known and not hires and j > t
        if j <= t or forced:
            nh = hires + (i,)
            if forced:
                finish(ranks, nh, i, True, w * p)
            else:
                play(ranks, seq, i + 1, nh, left - 1, w * p)
            if p < 1:
                play(ranks, seq, i + 1, hires, left, w * (1 - p))
        else:
            play(ranks, seq, i + 1, hires, left, w)

    for n in range(0, M + 1):
        if prior[n] == 0:
            continue
        w = prior[n] / math.factorial(n)
        for seq in itertools.product(*[range(1, a + 1) for a in range(1, n + 1)]):
            play(abs_ranks(seq), seq, 1, (), m, w)
    ev = Evaluation()
    for key, a in acc.items():
        if isinstance(key, tuple) and key[0] == "dist":
            ev.rank_dist[key[1]] = a.total
        elif isinstance(key, tuple):
            ev.top[key[1]] = a.total
        else:
            setattr(ev, key, a.total)
    return ev


def skip_success(prior: list[float], r: int) -> float:
    """P(hire the overall best) for "pass r, then take the first best-so-far"
    (offers always accepted), by enumerating every order."""
    terms = []
    for n in range(1, len(prior)):
        if prior[n] == 0:
            continue
        w = prior[n] / math.factorial(n)
        for seq in itertools.product(*[range(1, a + 1) for a in range(1, n + 1)]):
            hire = next((i for i in range(r, n) if seq[i] == 1), None)
            if hire is not None and abs_ranks(seq)[hire] == 1:
                terms.append(w)
    return math.fsum(terms)
