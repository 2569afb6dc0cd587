"""The prior over the pool size N for the relative-rank engine.

``pool_prior(pool)`` turns a validated pool into a list ``prior`` with
``prior[n] = P(N = n)`` for ``n = 0..M`` (``M = pool.max_size``), summing to 1:

=================  ==========================================================
pool form          prior
=================  ==========================================================
``size``           all mass on ``n = size``
``size_min/max``   uniform on ``size_min..size_max`` (Presman & Sonin 1972)
``size_mean``      Poisson(mean), cut at ``M`` and renormalised (see below)
``size_weights``   ``P(N = n)`` proportional to ``weights[n-1]``, n = 1..M
=================  ==========================================================

Poisson truncation: :attr:`seqpick.scenario.PoissonPool.max_size` is
``ceil(mean + 12 sqrt(mean) + 40)``; the Poisson mass above it is below 1e-16
for every allowed mean (at least 12 standard deviations and 40 counts above
the mean).  That tail is dropped and the rest renormalised to sum to 1, so
every number computed from the prior is exact for the truncated prior, which
differs from the untruncated one by less than 1e-16 in total variation.
Entries below the smallest normal float (about 2.2e-308) are set to 0 (their
true value is smaller still).

``survival(prior)`` gives ``S[i] = P(N >= i)`` for ``i = 0..M+1``, summed
from the top (small terms first, so every tail keeps its relative precision).

Complexity: O(M) time and memory for every function here.  The loops run in
C (``itertools.accumulate``, ``map``, slicing) in the same order of
operations as plain loops would.

References
----------
Presman, E. L. & Sonin, I. M. (1972). The best choice problem for a random
number of objects. *Theory Probab. Appl.* 17, 657-668.
Loader, C. (2000). Fast and accurate computation of binomial probabilities.
Technical note, AT&T Labs (saddle-point form of the Poisson pmf).
"""

from __future__ import annotations

import math
import sys
from itertools import accumulate, compress, repeat
from operator import ge, lt, mul, truediv

from .errors import ScenarioError
from .scenario import FixedPool, PoissonPool, Pool, RangePool, WeightsPool

__all__ = ["poisson_pmf", "pool_prior", "survival", "suffix_sums", "prior_mean",
           "single_size", "wide_fsum"]


_HALF_LOG_2PI = 0.5 * math.log(2.0 * math.pi)
_TINY = sys.float_info.min          # smallest normal float, about 2.2e-308


_STIRLERR_SMALL = [math.lgamma(n + 1.0) - (n + 0.5) * math.log(n) + n - _HALF_LOG_2PI
                   if n > 0 else 0.0 for n in range(16)]


def _stirlerr(n: int) -> float:
    """log(n!) - (n + 1/2) log n + n - log(sqrt(2 pi)), n >= 1 (Loader 2000)."""
    if n <= 15:
        return _STIRLERR_SMALL[n]
    x = 1.0 / n
    x2 = x * x
    return x * (1.0 / 12 - x2 * (1.0 / 360 - x2 * (1.0 / 1260 - x2 * (1.0 / 1680
                                                                     - x2 / 1188))))


def _bd0(x: float, mu: float) -> float:
    """x log(x/mu) + mu - x without cancellation (Loader 2000)."""
    if abs(x - mu) < 0.1 * (x + mu):
        v = (x - mu) / (x + mu)
        s = (x - mu) * v
        ej = 2.0 * x * v
        v2 = v * v
        j = 1
        while True:
            ej *= v2
            s1 = s + ej / (2 * j + 1)
            if s1 == s:
                return s1
            s = s1
            j += 1
    return x * math.log(x / mu) + mu - x


def wide_fsum(values: list[float]) -> float:
    """``math.fsum`` of non-negative values, fast when they span many orders.

    ``math.fsum`` keeps one partial sum per range of exponents, so a Poisson
    pmf (values from ~1e-2 down to 1e-308) costs it ~20 partials per term.
    Terms below 1e-30 of the largest are summed separately in plain floating
    point and added to the exactly rounded sum of the others: together they
    are below 1e-26 of the total, far below its last digit.  O(len), in C.
    """
    if not values:
        return 0.0
    cut = max(values) * 1e-30
    big = math.fsum(compress(values, map(ge, values, repeat(cut))))
    return big + sum(compress(values, map(lt, values, repeat(cut))))


def poisson_pmf(mean: float, max_n: int, *, normalise: bool = False) -> list[float]:
    """P(N = n) for n = 0..max_n, N ~ Poisson(mean), mean > 0.  O(max_n).

    Stable for any mean: the value at the mode ``floor(mean)`` comes from the
    saddle-point form ``exp(-stirlerr(x) - bd0(x, mean)) / sqrt(2 pi x)``
    (Loader 2000; relative error about 1e-15 at any size, where a plain
    ``lgamma`` difference loses ~1e-16 * mean), the others from the exact
    ratios ``p(n+1) = p(n) * mean / (n+1)`` walking up and
    ``p(n-1) = p(n) * n / mean`` walking down -- no overflow, no big
    factorial.  Values below the smallest normal float (~2.2e-308) are set
    to 0.

    With ``normalise=True`` the list is divided by its sum
    (:func:`wide_fsum`; the truncated tail above ``max_n`` is dropped);
    otherwise the raw pmf values are returned.

    References
    ----------
    Loader, C. (2000). Fast and accurate computation of binomial
    probabilities. Technical note, AT&T Labs (the ``stirlerr``/``bd0`` form
    used by R and SciPy).
    """
    if not (mean > 0.0) or not math.isfinite(mean):
        raise ValueError("poisson_pmf needs a finite mean > 0")
    if max_n < 0:
        raise ValueError("poisson_pmf needs max_n >= 0")
    out = [0.0] * (max_n + 1)
    mode = min(int(math.floor(mean)), max_n)
    if mode == 0:
        out[0] = math.exp(-mean)
    else:
        out[mode] = (math.exp(-_stirlerr(mode) - _bd0(float(mode), mean))
                     / math.sqrt(2.0 * math.pi * mode))
    v = out[mode]
    # walk up: p(n+1) = p(n) * (mean / (n+1)), the products in order
    up = list(accumulate([mean / (n + 1) for n in range(mode, max_n)], mul, initial=v))
    out[mode + 1:] = up[1:]
    # walk down: p(n-1) = p(n) * (n / mean), stopping below the smallest normal
    # float (subnormal values carry almost no digits and make every later sum
    # over them slow; they are set to 0 like the ones that underflow)
    down = list(accumulate([n / mean for n in range(mode, 0, -1)], mul, initial=v))[1:]
    if down and down[-1] < _TINY:
        cut = next(j for j, w in enumerate(down) if w < _TINY)
        down = down[:cut]
    out[mode - len(down):mode] = down[::-1]
    if up and up[-1] < _TINY:
        for j in range(mode + 1, max_n + 1):
            if out[j] < _TINY:
                out[j:] = [0.0] * (max_n + 1 - j)
                break
    if normalise:
        total = wide_fsum(out)
        out = list(map(truediv, out, repeat(total)))
    return out


def pool_prior(pool: Pool) -> list[float]:
    """``prior[n] = P(N = n)`` for n = 0..pool.max_size, summing to 1.  O(M).

    Raises
    ------
    ScenarioError
        on ``pool`` for a form that has no size prior (time windows, chances).
    """
    if isinstance(pool, WeightsPool):
        # pool.max_size scans every weight in Python; the last positive one is
        # usually the last
        ws = pool.weights
        m = len(ws)
        while m > 0 and not ws[m - 1] > 0:
            m -= 1
        w = [0.0]
        w += map(float, ws[:m])
        total = math.fsum(w)
        return list(map(truediv, w, repeat(total)))
    m = pool.max_size
    if isinstance(pool, FixedPool):
        prior = [0.0] * (m + 1)
        prior[m] = 1.0
        return prior
    if isinstance(pool, RangePool):
        lo, hi = pool.size_min, pool.size_max
        w = 1.0 / (hi - lo + 1)
        return [0.0] * lo + [w] * (hi - lo + 1)
    if isinstance(pool, PoissonPool):
        return poisson_pmf(pool.size_mean, m, normalise=True)
    raise ScenarioError("pool", f"the {getattr(pool, 'kind', '?')} pool form has no "
                                "size prior for the relative-rank engine")


def suffix_sums(values: list[float]) -> list[float]:
    """``out[i] = sum(values[i:])`` for i = 0..len, summed from the top.  O(len)."""
    out = list(accumulate(reversed(values)))
    out.reverse()
    out.append(0.0)
    return out


def survival(prior: list[float]) -> list[float]:
    """``S[i] = P(N >= i)`` for i = 0..M+1 (``S[0] = 1``, ``S[M+1] = 0``).  O(M)."""
    s = suffix_sums(prior)
    s[0] = 1.0 if s[0] > 0 else 0.0
    return s


def prior_mean(prior: list[float]) -> float:
    """E[N] (:func:`wide_fsum` of n prior[n]).  O(M)."""
    return wide_fsum(list(map(mul, range(len(prior)), prior)))


def single_size(prior: list[float]) -> int | None:
    """The pool size if the prior puts all its mass on one size, else None."""
    if len(prior) - prior.count(0.0) != 1:
        return None
    last = len(prior) - 1
    if prior[last] > 0.0:
        return last
    return next(n for n, w in enumerate(prior) if w > 0.0)
