"""Harmonic numbers and harmonic tails in double precision, O(1) each.

``harmonic(n)`` = 1 + 1/2 + ... + 1/n and ``tail(a, b)`` = 1/a + ... + 1/b are
needed all over the best-choice formulas.  Summing term by term costs O(n) and
accumulates rounding error; here small arguments come from an exactly rounded
table (``math.fsum``) and large ones from the asymptotic (Euler-Maclaurin)
expansion of the digamma function, which for n > 256 is accurate to far below
one unit in the last place.  Differences of two large harmonic numbers are
formed as ``log(b/a)`` plus differences of the correction terms, so a tail
keeps its full relative precision even when it is tiny compared with the
harmonic numbers themselves.

References
----------
Abramowitz, M. & Stegun, I. A. (1964). *Handbook of Mathematical Functions*,
formula 6.3.18 (asymptotic expansion of the digamma function).
"""

from __future__ import annotations

import math
from functools import lru_cache

__all__ = ["harmonic", "tail", "EULER_GAMMA"]

EULER_GAMMA = 0.57721566490153286060651209008240243
_TABLE_MAX = 256


@lru_cache(maxsize=1)
def _table() -> tuple[float, ...]:
    # H(0..256), each exactly rounded from the float terms 1/k.
    return tuple(math.fsum(1.0 / k for k in range(1, n + 1)) for n in range(_TABLE_MAX + 1))


def _corr(n: int) -> float:
    """H(n) - ln n - gamma for n > 256 (Abramowitz & Stegun 6.3.18).

    The first omitted term is below 1/(132 n^10) < 1e-26.
    """
    x = 1.0 / n
    x2 = x * x
    return x * 0.5 - x2 * (1.0 / 12 - x2 * (1.0 / 120 - x2 * (1.0 / 252 - x2 * (1.0 / 240))))


def harmonic(n: int) -> float:
    """H(n) = sum_{k=1}^{n} 1/k for n >= 0 (H(0) = 0).  O(1)."""
    if n < 0:
        raise ValueError("harmonic(n) needs n >= 0")
    if n <= _TABLE_MAX:
        return _table()[n]
    return math.log(n) + EULER_GAMMA + _corr(n)


def tail(a: int, b: int) -> float:
    """sum_{k=a}^{b} 1/k for 1 <= a (0 when b < a).  O(1), full relative precision."""
    if b < a:
        return 0.0
    if a < 1:
        raise ValueError("tail(a, b) needs a >= 1")
    if b <= _TABLE_MAX:
        if b - a < 16:
            return math.fsum(1.0 / k for k in range(a, b + 1))
        return _table()[b] - _table()[a - 1]
    if a - 1 <= _TABLE_MAX:
        if b - a < 64:
            return math.fsum(1.0 / k for k in range(a, b + 1))
        return harmonic(b) - _table()[a - 1]
    if b - a < 64:
        return math.fsum(1.0 / k for k in range(a, b + 1))
    # H(b) - H(a-1) = ln(b/(a-1)) + corr(b) - corr(a-1)
    return math.log(b / (a - 1)) + (_corr(b) - _corr(a - 1))
