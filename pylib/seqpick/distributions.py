"""Score distributions for the full-information engine (standard library only).

A :class:`ScoreDistribution` is the known distribution of one candidate's
score X, continuous, with distribution function F.  The engine works with
the *quantile* u = F(X), uniform on (0, 1) and the same for every
distribution, and needs from the distribution only:

* ``cdf(x)`` = F(x) and ``quantile(u)`` = F^-1(u);
* ``tail_mean(u)`` = psi(u) = E[X; F(X) > u] = integral of F^-1 over (u, 1);
* ``excess(c)`` = E[(X - c)^+], so ``emax(c)`` = E[max(X, c)] = c + excess(c)
  (Moser's recursion) and ``partial_above(c)`` = E[X; X > c] = psi(F(c));
* ``upper_parts(c)`` = (1 - F(c), E[X; X > c], E[(X - c)^+]) in one call
  (one erfc and one exp for the normal, one bisection for a sample);
* ``kinks``: quantiles where psi is not smooth (empty except for ``sample``).

Three families:

``uniform(low, high)``
    All in closed form: F(x) = (x - low)/(high - low), psi(u) =
    low (1 - u) + (high - low)(1 - u^2)/2, excess(c) = (high - c)^2 /
    (2 (high - low)) inside the range.
``normal(mean, sd)``
    Phi(z) = erfc(-z/sqrt 2)/2 (math.erfc keeps full relative precision in
    both tails); psi(u) = mean (1 - u) + sd phi(z(u)); excess(c) =
    sd (phi(z) - z Q(z)), Q = 1 - Phi, and for z >= 5 the equivalent form
    sd phi(z) t/(z + t) with t from the continued fraction of the Mills ratio
    (no cancellation).  The inverse Phi starts from Acklam's rational
    approximation (relative error about 1.15e-9) and is refined by one Halley
    step on erfc (cubic convergence: 1e-9 becomes 1e-27), which brings it to
    full double precision.
``sample(values)``
    Past scores, turned into a continuous distribution by the piecewise-linear
    CDF through Hazen plotting positions: the k-th smallest of n distinct
    scores sits at height (k - 1/2)/n.  Tied scores share one knot at the
    middle of their block (height (below + count/2)/n), which is the
    mid-distribution function and reduces to Hazen's positions without ties.
    Scores closer than :data:`TIE_TOL` x max(1, |score|) to the first score of
    a tie block count as tied (closer knots cannot be told apart by the
    interpolated quantiles in double precision).
    The CDF rises linearly from 0 at ``min - g/2`` to the first knot and from
    the last knot to 1 at ``max + g/2``, where g = (max - min)/(K - 1) is the
    average gap between the K distinct scores ("common practice": a short
    linear tail, so that a new score may fall a little outside the range seen
    so far).  The density is constant between knots, so F, F^-1, psi and the
    excess are all exact piecewise formulas (psi is piecewise quadratic in
    u, with kinks at the knot heights).  With fewer than
    :data:`SMALL_SAMPLE` scores ``warning`` says the cut-offs are rough.

Complexity: O(1) per call for uniform and normal; O(log K) per call for a
sample of K distinct scores (bisection), O(K log K) to build it.

References
----------
Acklam, P. J. (2003). An algorithm for computing the inverse normal
cumulative distribution function (published on the author's web page; the
coefficients below are from memory and are only a starting point: a Halley
step makes the result exact to rounding, checked against scipy in the tests).
Wichura, M. J. (1988). Algorithm AS 241: The percentage points of the normal
distribution. *Applied Statistics* 37, 477-484 (the reference accuracy the
refined result is tested against, via scipy.special.ndtri).
Halley's method: e.g. Press, W. H. et al. (2007). *Numerical Recipes*, 3rd
ed., section 6.2.2 (refining an inverse CDF).
Hazen, A. (1914). Storage to be provided in impounding reservoirs for
municipal water supply. *Trans. Amer. Soc. Civil Engineers* 77, 1539-1640
(plotting positions (k - 1/2)/n; from memory).
Abramowitz, M. & Stegun, I. A. (1964). *Handbook of Mathematical Functions*,
26.2.14 (continued fraction for the normal tail / Mills ratio).
"""

from __future__ import annotations

import bisect
import math
from typing import Sequence

from .errors import ScenarioError
from .scenario import Scores

__all__ = [
    "SMALL_SAMPLE",
    "TIE_TOL",
    "ScoreDistribution",
    "Uniform",
    "Normal",
    "Sample",
    "norm_cdf",
    "norm_sf",
    "norm_pdf",
    "norm_ppf",
    "from_scores",
]

#: Fewer past scores than this give a warning.
SMALL_SAMPLE = 30
#: Past scores closer than this (relative to max(1, |score|)) are ties.
TIE_TOL = 1e-6

_SQRT2 = math.sqrt(2.0)
_INV_SQRT2PI = 1.0 / math.sqrt(2.0 * math.pi)
_SQRT2PI = math.sqrt(2.0 * math.pi)


# --------------------------------------------------------------------------
# the standard normal
# --------------------------------------------------------------------------

def norm_pdf(z: float) -> float:
    """phi(z)."""
    return _INV_SQRT2PI * math.exp(-0.5 * z * z)


def norm_cdf(z: float) -> float:
    """Phi(z), full relative precision in the lower tail."""
    return 0.5 * math.erfc(-z / _SQRT2)


def norm_sf(z: float) -> float:
    """1 - Phi(z), full relative precision in the upper tail."""
    return 0.5 * math.erfc(z / _SQRT2)


# Acklam's coefficients (see References).
_A = (-3.969683028665376e+01, 2.209460984245205e+02, -2.759285104469687e+02,
      1.383577518672690e+02, -3.066479806614716e+01, 2.506628277459239e+00)
_B = (-5.447609879822406e+01, 1.615858368580409e+02, -1.556989798598866e+02,
      6.680131188771972e+01, -1.328068155288572e+01)
_C = (-7.784894002430293e-03, -3.223964580411365e-01, -2.400758277161838e+00,
      -2.549732539343734e+00, 4.374664141464968e+00, 2.938163982698783e+00)
_D = (7.784695709041462e-03, 3.224671290700398e-01, 2.445134137142996e+00,
      3.754408661907416e+00)
_P_LOW = 0.02425


def _acklam(p: float) -> float:
    if p < _P_LOW:
        q = math.sqrt(-2.0 * math.log(p))
        return ((((((_C[0] * q + _C[1]) * q + _C[2]) * q + _C[3]) * q + _C[4]) * q + _C[5])
                / ((((_D[0] * q + _D[1]) * q + _D[2]) * q + _D[3]) * q + 1.0))
    if p > 1.0 - _P_LOW:
        q = math.sqrt(-2.0 * math.log1p(-p))
        return -((((((_C[0] * q + _C[1]) * q + _C[2]) * q + _C[3]) * q + _C[4]) * q + _C[5])
                 / ((((_D[0] * q + _D[1]) * q + _D[2]) * q + _D[3]) * q + 1.0))
    q = p - 0.5
    r = q * q
    return ((((((_A[0] * r + _A[1]) * r + _A[2]) * r + _A[3]) * r + _A[4]) * r + _A[5]) * q
            / (((((_B[0] * r + _B[1]) * r + _B[2]) * r + _B[3]) * r + _B[4]) * r + 1.0))


def norm_ppf(p: float) -> float:
    """Phi^-1(p): Acklam's start, then one Halley step.

    The Halley step works on the smaller tail (lower tail for p < 1/2 with
    Phi, upper tail with 1 - Phi), so the residual keeps its relative
    precision; it converges cubically from a 1e-9 start.  Returns -inf / +inf
    at p = 0 / 1.
    """
    if not p > 0.0:
        return -math.inf
    if not p < 1.0:
        return math.inf
    x = _acklam(p)
    # one Halley step: the start has relative error ~1e-9 and the step is cubic
    if p < 0.5:
        e = norm_cdf(x) - p
    else:
        e = (1.0 - p) - norm_sf(x)
    u = e * _SQRT2PI * math.exp(0.5 * x * x)
    return x - u / (1.0 + 0.5 * x * u)


def _std_excess(z: float) -> float:
    """E[(Z - z)^+] for a standard normal Z, without cancellation."""
    if z < 5.0:
        return norm_pdf(z) - z * norm_sf(z)
    # Q(z) = phi(z) R(z), R = 1/(z + s), s = 1/(z + 2/(z + 3/(...))) ... with the
    # continued fraction written as R = 1/(z + 1/(z + 2/(z + 3/ ...))).
    # Then 1 - z R = s/(z + s) where s = 1/(z + 2/(z + 3/(z + ...))).
    s = 0.0
    for k in range(80, 1, -1):
        s = k / (z + s)
    s = 1.0 / (z + s)
    return norm_pdf(z) * s / (z + s)


# --------------------------------------------------------------------------
# distributions
# --------------------------------------------------------------------------

class ScoreDistribution:
    """Base class; see the module docstring for the meaning of each method."""

    name: str = ""
    kinks: tuple[float, ...] = ()
    warning: str | None = None

    def cdf(self, x: float) -> float:  # pragma: no cover - abstract
        raise NotImplementedError

    def quantile(self, u: float) -> float:  # pragma: no cover - abstract
        raise NotImplementedError

    def tail_mean(self, u: float) -> float:  # pragma: no cover - abstract
        raise NotImplementedError

    def excess(self, c: float) -> float:
        """E[(X - c)^+]."""
        u = self.cdf(c)
        return max(0.0, self.tail_mean(u) - c * (1.0 - u))

    @property
    def mean(self) -> float:
        return self.tail_mean(0.0)

    def emax(self, c: float) -> float:
        """E[max(X, c)] = c + E[(X - c)^+]."""
        return c + self.excess(c)

    def partial_above(self, c: float) -> float:
        """E[X; X > c] = psi(F(c))."""
        return self.tail_mean(self.cdf(c))

    def upper_parts(self, c: float) -> tuple[float, float, float]:
        """(P(X > c), E[X; X > c], E[(X - c)^+]) in one call (Moser's recursion
        and its forward evaluation need all three at every stage)."""
        u = self.cdf(c)
        pab = self.tail_mean(u)
        return 1.0 - u, pab, max(0.0, pab - c * (1.0 - u))

    @property
    def support(self) -> tuple[float, float]:  # pragma: no cover - abstract
        raise NotImplementedError

    def abs_mean_bound(self) -> float:
        """An upper bound on E|X| (for quadrature error bounds)."""
        lo, hi = self.support
        if math.isfinite(lo) and math.isfinite(hi):
            return max(abs(lo), abs(hi))
        return abs(self.mean) + 2.0  # overridden by Normal

    def describe(self) -> str:  # pragma: no cover - abstract
        raise NotImplementedError


class Uniform(ScoreDistribution):
    """Scores uniform on [low, high]."""

    name = "uniform"

    def __init__(self, low: float, high: float) -> None:
        if not high > low:
            raise ValueError("need low < high")
        self.low = float(low)
        self.high = float(high)
        self.width = self.high - self.low

    def cdf(self, x: float) -> float:
        if x <= self.low:
            return 0.0
        if x >= self.high:
            return 1.0
        return (x - self.low) / self.width

    def quantile(self, u: float) -> float:
        u = min(max(u, 0.0), 1.0)
        return self.low + self.width * u

    def tail_mean(self, u: float) -> float:
        u = min(max(u, 0.0), 1.0)
        return self.low * (1.0 - u) + self.width * (1.0 - u) * (1.0 + u) * 0.5

    def excess(self, c: float) -> float:
        if c <= self.low:
            return 0.5 * (self.low + self.high) - c
        if c >= self.high:
            return 0.0
        d = self.high - c
        return d * d / (2.0 * self.width)

    def upper_parts(self, c: float) -> tuple[float, float, float]:
        u = self.cdf(c)
        return 1.0 - u, self.tail_mean(u), self.excess(c)

    @property
    def support(self) -> tuple[float, float]:
        return (self.low, self.high)

    def describe(self) -> str:
        return f"uniform from {self.low:g} to {self.high:g}"


class Normal(ScoreDistribution):
    """Scores normal with the given mean and standard deviation."""

    name = "normal"

    def __init__(self, mean: float, sd: float) -> None:
        if not sd > 0:
            raise ValueError("need sd > 0")
        self.mu = float(mean)
        self.sd = float(sd)

    def cdf(self, x: float) -> float:
        return norm_cdf((x - self.mu) / self.sd)

    def quantile(self, u: float) -> float:
        return self.mu + self.sd * norm_ppf(u)

    def tail_mean(self, u: float) -> float:
        if not u > 0.0:
            return self.mu
        if not u < 1.0:
            return 0.0
        z = norm_ppf(u)
        return self.mu * (1.0 - u) + self.sd * norm_pdf(z)

    def excess(self, c: float) -> float:
        return self.sd * _std_excess((c - self.mu) / self.sd)

    def upper_parts(self, c: float) -> tuple[float, float, float]:
        """One erfc and one exp: Q(z), phi(z) give all three (z = (c - mean)/sd);
        the excess for z >= 5 by the continued fraction of :func:`_std_excess`."""
        if c == -math.inf:
            return 1.0, self.mu, math.inf
        z = (c - self.mu) / self.sd
        q = 0.5 * math.erfc(z / _SQRT2)
        ph = _INV_SQRT2PI * math.exp(-0.5 * z * z)
        ex = ph - z * q if z < 5.0 else _std_excess(z)
        return q, self.mu * q + self.sd * ph, self.sd * ex

    @property
    def mean(self) -> float:
        return self.mu

    @property
    def support(self) -> tuple[float, float]:
        return (-math.inf, math.inf)

    def abs_mean_bound(self) -> float:
        return abs(self.mu) + self.sd

    def describe(self) -> str:
        return f"normal with mean {self.mu:g} and standard deviation {self.sd:g}"


class Sample(ScoreDistribution):
    """Past scores as a piecewise-linear CDF (see the module docstring)."""

    name = "sample"

    def __init__(self, values: Sequence[float]) -> None:
        vals = sorted(float(v) for v in values)
        n = len(vals)
        distinct: list[float] = []
        counts: list[int] = []
        for v in vals:
            # scores within TIE_TOL x max(1, |score|) of a tie group's first score
            # count as the same score (below that, floats cannot resolve the
            # interpolated quantiles)
            if distinct and v - distinct[-1] <= TIE_TOL * max(1.0, abs(v)):
                counts[-1] += 1
            else:
                distinct.append(v)
                counts.append(1)
        k = len(distinct)
        if k < 2:
            raise ValueError("need at least two different values")
        self.n = n
        self.distinct = k
        gap = (distinct[-1] - distinct[0]) / (k - 1)
        xs = [distinct[0] - 0.5 * gap]
        fs = [0.0]
        below = 0
        for v, m in zip(distinct, counts):
            xs.append(v)
            fs.append((below + 0.5 * m) / n)
            below += m
        xs.append(distinct[-1] + 0.5 * gap)
        fs.append(1.0)
        self.xs = xs          # knots (scores), increasing
        self.fs = fs          # knot heights F(xs[i]), increasing from 0 to 1
        # psi at each knot: integral of the quantile from fs[i] to 1
        top = [0.0] * len(xs)
        for i in range(len(xs) - 2, -1, -1):
            top[i] = top[i + 1] + (fs[i + 1] - fs[i]) * 0.5 * (xs[i] + xs[i + 1])
        self._psi_knots = top
        self.kinks = tuple(fs[1:-1])
        self.warning = (f"only {n} past scores: the cutoffs are rough"
                        if n < SMALL_SAMPLE else None)

    def _seg_u(self, u: float) -> int:
        """Index i with fs[i] <= u <= fs[i+1]."""
        i = bisect.bisect_right(self.fs, u) - 1
        return min(max(i, 0), len(self.fs) - 2)

    def cdf(self, x: float) -> float:
        xs, fs = self.xs, self.fs
        if x <= xs[0]:
            return 0.0
        if x >= xs[-1]:
            return 1.0
        i = bisect.bisect_right(xs, x) - 1
        i = min(max(i, 0), len(xs) - 2)
        t = (x - xs[i]) / (xs[i + 1] - xs[i])
        return fs[i] + t * (fs[i + 1] - fs[i])

    def quantile(self, u: float) -> float:
        u = min(max(u, 0.0), 1.0)
        i = self._seg_u(u)
        fs, xs = self.fs, self.xs
        t = (u - fs[i]) / (fs[i + 1] - fs[i])
        return xs[i] + t * (xs[i + 1] - xs[i])

    def tail_mean(self, u: float) -> float:
        u = min(max(u, 0.0), 1.0)
        i = self._seg_u(u)
        return self._psi_knots[i + 1] + (self.fs[i + 1] - u) * 0.5 * (
            self.quantile(u) + self.xs[i + 1])

    def excess(self, c: float) -> float:
        xs = self.xs
        if c <= xs[0]:
            return self.mean - c
        if c >= xs[-1]:
            return 0.0
        u = self.cdf(c)
        i = self._seg_u(u)
        # integral of (Q(v) - c) over (u, 1): the part of segment i above c plus
        # the whole segments above, each a trapezoid of positive height.
        part = (self.fs[i + 1] - u) * 0.5 * (xs[i + 1] - c)
        rest = self._psi_knots[i + 1] - c * (1.0 - self.fs[i + 1])
        return max(0.0, part + rest)

    def upper_parts(self, c: float) -> tuple[float, float, float]:
        """One bisection for all three (see :meth:`excess`)."""
        xs, fs = self.xs, self.fs
        if c <= xs[0]:
            return 1.0, self.mean, self.mean - c
        if c >= xs[-1]:
            return 0.0, 0.0, 0.0
        i = bisect.bisect_right(xs, c, 1, len(xs) - 1) - 1
        x0, x1, f0, f1 = xs[i], xs[i + 1], fs[i], fs[i + 1]
        u = f0 + (c - x0) / (x1 - x0) * (f1 - f0)
        part = (f1 - u) * 0.5 * (x1 - c)
        top = self._psi_knots[i + 1]
        rest = top - c * (1.0 - f1)
        pab = top + (f1 - u) * 0.5 * (c + x1)
        return 1.0 - u, pab, max(0.0, part + rest)

    @property
    def mean(self) -> float:
        return self._psi_knots[0]

    @property
    def support(self) -> tuple[float, float]:
        return (self.xs[0], self.xs[-1])

    def describe(self) -> str:
        return (f"{self.n:,} past scores from {self.xs[1]:g} to {self.xs[-2]:g} "
                f"(smoothed)")


def from_scores(scores: Scores) -> ScoreDistribution:
    """The distribution of a validated :class:`~seqpick.scenario.Scores`."""
    if scores.distribution == "uniform":
        assert scores.low is not None and scores.high is not None
        return Uniform(scores.low, scores.high)
    if scores.distribution == "normal":
        assert scores.mean is not None and scores.sd is not None
        return Normal(scores.mean, scores.sd)
    if scores.distribution == "sample":
        try:
            return Sample(scores.values or ())
        except ValueError as e:
            raise ScenarioError("scores.values", str(e)) from None
    raise ScenarioError("scores.distribution", f"got {scores.distribution!r}; expected "
                        "uniform, normal or sample")
