"""Score distributions: the normal CDF and its inverse, partial expectations, and
the piecewise-linear interpolation of past scores.

Independent checks: scipy.special (ndtr / ndtri, the latter implementing
Wichura 1988, AS 241), scipy.integrate.quad of the defining integrals, exact
rationals (fractions) for the uniform closed forms, and hypothesis properties.
"""

from __future__ import annotations

import math
from fractions import Fraction

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import integrate, special, stats

from seqpick.distributions import (SMALL_SAMPLE, TIE_TOL, Normal, Sample, Uniform,
                                   from_scores, norm_cdf, norm_pdf, norm_ppf, norm_sf)
from seqpick.errors import ScenarioError
from seqpick.scenario import Scores


# --------------------------------------------------------------------------
# the standard normal
# --------------------------------------------------------------------------

def test_norm_ppf_matches_as241_to_rounding():
    # scipy.special.ndtri implements Wichura (1988) AS 241, accurate to ~1e-16.
    ps = np.concatenate([np.logspace(-300, -1, 400), np.linspace(0.01, 0.99, 999),
                         1.0 - np.logspace(-16, -1, 300)])
    worst = max(abs(norm_ppf(float(p)) - special.ndtri(p)) / max(1.0, abs(special.ndtri(p)))
                for p in ps)
    assert worst < 2e-15


def test_norm_ppf_ends_and_symmetry():
    assert norm_ppf(0.0) == -math.inf and norm_ppf(1.0) == math.inf
    assert norm_ppf(0.5) == pytest.approx(0.0, abs=1e-16)
    for p in (2.0 ** -40, 2.0 ** -7, 0.25, 0.375):   # 1 - p is exact in binary
        assert norm_ppf(p) == pytest.approx(-norm_ppf(1.0 - p), rel=1e-14)


def test_norm_cdf_sf_pdf():
    for z in (-38.0, -10.0, -3.0, -0.5, 0.0, 0.7, 4.0, 12.0, 30.0):
        # erfc(z/sqrt 2) carries the rounding of z/sqrt 2, amplified by z^2 in the tails
        assert norm_cdf(z) == pytest.approx(special.ndtr(z), rel=1e-12, abs=1e-300)
        assert norm_sf(z) == pytest.approx(special.ndtr(-z), rel=1e-12, abs=1e-300)
        # exp(-z^2/2) carries the rounding of z^2/2 (relative 1e-16 x 450 at z = 30)
        assert norm_pdf(z) == pytest.approx(stats.norm.pdf(z), rel=1e-12, abs=1e-300)


@pytest.mark.parametrize("z", [-10.0, -3.0, 0.0, 1.0, 3.0, 4.9, 5.0, 6.0, 10.0, 20.0, 35.0])
def test_normal_excess_vs_quad(z):
    # E[(Z - z)^+], including the upper tail where the direct formula cancels.
    want = integrate.quad(lambda x: (x - z) * stats.norm.pdf(x), z, np.inf, epsabs=0,
                          epsrel=1e-13, limit=200)[0]
    got = Normal(0.0, 1.0).excess(z)
    assert got == pytest.approx(want, rel=1e-11)


def test_normal_moments_and_emax():
    d = Normal(70.0, 10.0)
    assert d.mean == 70.0
    for c in (40.0, 65.0, 70.0, 88.0):
        want = (c * stats.norm.cdf(c, 70, 10)
                + integrate.quad(lambda x: x * stats.norm.pdf(x, 70, 10), c, np.inf,
                                 epsabs=1e-12)[0])
        assert d.emax(c) == pytest.approx(want, rel=1e-12)
        # psi(F(c)) = E[X; X > c]
        want2 = integrate.quad(lambda x: x * stats.norm.pdf(x, 70, 10), c, np.inf,
                               epsabs=1e-12)[0]
        assert d.partial_above(c) == pytest.approx(want2, rel=1e-11)
    assert d.tail_mean(0.0) == 70.0 and d.tail_mean(1.0) == 0.0


# --------------------------------------------------------------------------
# uniform
# --------------------------------------------------------------------------

def test_uniform_closed_forms_exact():
    d = Uniform(2.0, 7.0)
    for c in (Fraction(-1), Fraction(2), Fraction(3), Fraction(11, 2), Fraction(7), Fraction(9)):
        # E[(X - c)^+] for X uniform on [2, 7], exact
        if c <= 2:
            want = Fraction(9, 2) - c
        elif c >= 7:
            want = Fraction(0)
        else:
            want = (7 - c) ** 2 / (2 * 5)
        assert d.excess(float(c)) == pytest.approx(float(want), abs=1e-15)
    for u in (Fraction(0), Fraction(1, 4), Fraction(1, 2), Fraction(9, 10), Fraction(1)):
        # psi(u) = int_u^1 (2 + 5 v) dv
        want = 2 * (1 - u) + Fraction(5, 2) * (1 - u * u)
        assert d.tail_mean(float(u)) == pytest.approx(float(want), abs=1e-15)
    assert d.cdf(4.5) == 0.5 and d.quantile(0.5) == 4.5


# --------------------------------------------------------------------------
# sample
# --------------------------------------------------------------------------

def test_sample_knots_are_hazen_positions():
    vals = [5.0, 1.0, 9.0, 3.0]
    d = Sample(vals)
    # sorted 1, 3, 5, 9 at heights (k - 1/2)/4; tails extended by half the average gap
    gap = (9.0 - 1.0) / 3
    assert d.xs == pytest.approx([1 - gap / 2, 1, 3, 5, 9, 9 + gap / 2])
    assert d.fs == pytest.approx([0.0, 0.125, 0.375, 0.625, 0.875, 1.0])
    for k, v in enumerate(sorted(vals), start=1):
        assert d.cdf(v) == pytest.approx((k - 0.5) / 4)


def test_sample_ties_share_the_middle_of_their_block():
    d = Sample([2.0, 2.0, 2.0, 6.0])
    # the three 2s occupy ranks 1..3: one knot at height 1.5/4; 6 at 3.5/4
    assert d.cdf(2.0) == pytest.approx(1.5 / 4)
    assert d.cdf(6.0) == pytest.approx(3.5 / 4)


def test_sample_inverse_and_partial_expectations():
    d = Sample([3, 5, 5, 8, 9, 13, 20, 21, 2.5, 14])
    for x in np.linspace(d.xs[0], d.xs[-1], 57):
        assert d.quantile(d.cdf(x)) == pytest.approx(x, abs=1e-12)
    pts = list(d.fs)
    mean = integrate.quad(d.quantile, 0, 1, points=pts, limit=200)[0]
    assert d.mean == pytest.approx(mean, rel=1e-13)
    for c in (0.0, 2.4, 5.0, 7.7, 13.0, 20.9, 30.0):
        want = integrate.quad(lambda u: max(d.quantile(u) - c, 0.0), 0, 1,
                              points=pts + [d.cdf(c)], limit=200, epsabs=1e-14)[0]
        assert d.excess(c) == pytest.approx(want, abs=1e-12)
        u = d.cdf(c)
        want2 = integrate.quad(d.quantile, u, 1, points=[p for p in pts if p > u] or None,
                               limit=200)[0]
        assert d.tail_mean(u) == pytest.approx(want2, abs=1e-12)


def test_sample_warning_for_small_samples():
    assert Sample(list(range(12))).warning == "only 12 past scores: the cutoffs are rough"
    assert Sample(list(range(SMALL_SAMPLE))).warning is None


def test_from_scores():
    assert isinstance(from_scores(Scores("uniform", low=0, high=1)), Uniform)
    assert isinstance(from_scores(Scores("normal", mean=0, sd=1)), Normal)
    assert isinstance(from_scores(Scores("sample", values=(1.0, 2.0))), Sample)
    with pytest.raises(ScenarioError) as e:
        from_scores(Scores("sample", values=(1.0, 1.0)))
    assert e.value.field == "scores.values"


def _two_scores(v):
    """At least two scores that are not ties (TIE_TOL): a valid sample."""
    return max(v) - min(v) > TIE_TOL * max(1.0, abs(max(v)), abs(min(v)))


@settings(max_examples=60, deadline=None)
@given(st.lists(st.floats(-1e6, 1e6, allow_nan=False), min_size=2, max_size=40).filter(
    _two_scores), st.floats(0.0, 1.0))
def test_sample_properties(vals, u):
    d = Sample(vals)
    x = d.quantile(u)
    assert d.xs[0] <= x <= d.xs[-1]
    assert d.cdf(x) == pytest.approx(u, abs=1e-9)
    # excess is non-increasing and convex-ish: E[max(X, c)] >= max(E X, c)
    lo, hi = d.support
    cs = sorted([lo - 1.0, x, hi + 1.0])
    ex = [d.excess(c) for c in cs]
    scale = max(1.0, abs(lo), abs(hi))
    assert ex[0] >= ex[1] - 1e-9 * scale
    assert ex[1] >= ex[2] - 1e-9 * scale
    assert ex[2] >= -1e-9 * scale
    assert d.emax(x) >= max(d.mean, x) - 1e-9 * scale


def test_sample_near_ties_are_ties():
    # two scores one unit in the last place apart cannot be told apart by the
    # interpolated quantiles: they count as a tie (TIE_TOL), so the values must
    # differ by more than that to make a distribution
    with pytest.raises(ValueError):
        Sample([-1000000.0, -999999.9999999999])
    d = Sample([5.0, 5.0 + 1e-8, 6.0])
    assert d.distinct == 2
    assert d.fs == pytest.approx([0.0, 1.0 / 3.0, 5.0 / 6.0, 1.0], abs=1e-15)


@pytest.mark.parametrize("d", [Uniform(2.0, 7.0), Normal(70.0, 10.0),
                               Sample([61, 72, 55, 90, 83, 77, 64, 70, 58, 81, 66, 74])])
def test_upper_parts_agree_with_the_separate_methods(d):
    lo, hi = d.support
    lo, hi = (max(lo, 0.0), min(hi, 140.0))
    for c in np.linspace(lo - 3.0, hi + 3.0, 157):
        q, pab, ex = d.upper_parts(float(c))
        assert q == pytest.approx(1.0 - d.cdf(float(c)), abs=1e-15)
        assert ex == pytest.approx(d.excess(float(c)), rel=1e-13, abs=1e-13)
        if isinstance(d, Normal):
            # E[X; X > c] = mean Q(z) + sd phi(z) by scipy (the separate method goes
            # through the inverse CDF), and by quad at a few points
            z = (float(c) - 70.0) / 10.0
            want = 70.0 * special.ndtr(-z) + 10.0 * stats.norm.pdf(z)
            assert pab == pytest.approx(want, rel=1e-13, abs=1e-13)
            if int(c) % 17 == 0:
                want = integrate.quad(lambda x: x * stats.norm.pdf(x, 70, 10), float(c),
                                      np.inf, epsabs=1e-12)[0]
                assert pab == pytest.approx(want, rel=1e-10, abs=1e-10)
        else:
            assert pab == pytest.approx(d.partial_above(float(c)), rel=1e-13, abs=1e-13)
