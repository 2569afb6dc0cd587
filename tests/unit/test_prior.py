"""The pool-size prior: Poisson pmf, pool forms, survival function.

Independent checks: scipy.stats (Poisson pmf and tail), exact fractions for
the uniform and weighted forms, math.fsum for the split sum.
"""

from __future__ import annotations

import math

import pytest
from scipy import stats

from seqpick.errors import ScenarioError
from seqpick.prior import (poisson_pmf, pool_prior, prior_mean, single_size, suffix_sums,
                           survival, wide_fsum)
from seqpick.scenario import ChancesPool, parse_scenario


def _pool(d):
    return parse_scenario({"pool": d}).pool


@pytest.mark.parametrize("mean", [1e-6, 0.3, 1.0, 7.5, 40.0, 1234.5, 89_000.0])
def test_poisson_pmf_matches_scipy(mean):
    max_n = _pool({"size_mean": mean}).max_size
    pmf = poisson_pmf(mean, max_n)
    ref = stats.poisson.pmf(range(max_n + 1), mean)
    for n in range(max_n + 1):
        if ref[n] > 1e-250:
            assert pmf[n] == pytest.approx(ref[n], rel=1e-11), n
        else:
            assert pmf[n] < 1e-240
    # the truncated tail is below 1e-16 (scipy's survival function)
    assert stats.poisson.sf(max_n, mean) < 1e-16
    assert math.fsum(pmf) == pytest.approx(1.0, abs=1e-13)


def test_poisson_pmf_normalised_and_errors():
    pmf = poisson_pmf(3.0, 5, normalise=True)
    assert math.fsum(pmf) == pytest.approx(1.0, abs=1e-15)
    ref = stats.poisson.pmf(range(6), 3.0)
    assert pmf[2] / pmf[0] == pytest.approx(ref[2] / ref[0], rel=1e-13)
    with pytest.raises(ValueError):
        poisson_pmf(0.0, 3)
    with pytest.raises(ValueError):
        poisson_pmf(1.0, -1)


def test_prior_forms():
    fixed = pool_prior(_pool({"size": 5}))
    assert fixed == [0, 0, 0, 0, 0, 1.0]
    rng = pool_prior(_pool({"size_min": 2, "size_max": 5}))
    assert rng == [0, 0, 0.25, 0.25, 0.25, 0.25]
    rng0 = pool_prior(_pool({"size_min": 0, "size_max": 1}))
    assert rng0 == [0.5, 0.5]
    w = pool_prior(_pool({"size_weights": [1, 0, 3, 0, 0]}))
    assert len(w) == 4                           # cut after the last positive weight
    assert w == [0.0, 0.25, 0.0, 0.75]
    poi = pool_prior(_pool({"size_mean": 12.0}))
    assert len(poi) == _pool({"size_mean": 12.0}).max_size + 1
    assert math.fsum(poi) == pytest.approx(1.0, abs=1e-15)
    for pr in (fixed, rng, rng0, w, poi):
        assert all(x >= 0 for x in pr)
        assert math.fsum(pr) == pytest.approx(1.0, abs=1e-15)


def test_prior_refuses_other_forms():
    with pytest.raises(ScenarioError) as e:
        pool_prior(ChancesPool((0.5, 0.5)))
    assert e.value.field == "pool"


def test_survival_and_helpers():
    pr = [0.1, 0.2, 0.3, 0.4]
    S = survival(pr)
    assert S == pytest.approx([1.0, 0.9, 0.7, 0.4, 0.0])
    assert suffix_sums([1.0, 2.0, 3.0]) == [6.0, 5.0, 3.0, 0.0]
    assert prior_mean(pr) == pytest.approx(0.2 + 0.6 + 1.2)
    assert single_size([0, 0, 1.0]) == 2
    assert single_size(pr) is None
    # tails keep their relative precision (summed from the top)
    tiny = [1.0 - 2e-20, 1e-20, 1e-20]
    assert survival(tiny)[1] == pytest.approx(2e-20, rel=1e-15)


def test_wide_fsum_equals_fsum():
    """The split sum equals math.fsum (exactly rounded) on wide-range inputs."""
    import random
    rng = random.Random(7)
    for _ in range(300):
        w = [rng.random() * 10.0 ** rng.randint(-300, 3) for _ in range(rng.randint(1, 400))]
        assert wide_fsum(w) == math.fsum(w)
    pmf = poisson_pmf(8000.0, _pool({"size_mean": 8000.0}).max_size)
    assert wide_fsum(pmf) == math.fsum(pmf)
    assert wide_fsum([]) == 0.0 and wide_fsum([0.0, 0.0]) == 0.0


def test_poisson_pmf_has_no_subnormals():
    """Values below the smallest normal float are 0 (they carry no digits and
    make sums over them slow); the rest still match scipy."""
    import sys
    mean = 8000.0
    max_n = _pool({"size_mean": mean}).max_size
    pmf = poisson_pmf(mean, max_n)
    assert all(x == 0.0 or x >= sys.float_info.min for x in pmf)
    ref = stats.poisson.pmf(range(max_n + 1), mean)
    for n in (4500, 6000, 8000, 9000, max_n):
        assert pmf[n] == pytest.approx(ref[n], rel=1e-11)
    assert pmf.count(0.0) > 3000                    # the far lower tail underflows


def test_weights_prior_ignores_trailing_zeros():
    pr = pool_prior(_pool({"size_weights": [0, 2, 0, 1, 0, 0, 0]}))
    assert pr == [0.0, 0.0, pytest.approx(2 / 3), 0.0, pytest.approx(1 / 3)]
    assert len(pr) == _pool({"size_weights": [0, 2, 0, 1, 0, 0, 0]}).max_size + 1
