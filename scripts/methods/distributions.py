"""Normal, Student t and noncentral t distribution functions from the Python standard library and
numpy alone, so the check values in docs/methods.md can be recomputed without the library reckon
itself uses (stdlib-js).

- Normal: statistics.NormalDist (Python standard library).
- Student t: F(t; v) = 1 - I_x(v/2, 1/2)/2 for t > 0, x = v/(v + t^2), with the regularised
  incomplete beta I_x by its continued fraction (Abramowitz & Stegun 1964, eq. 26.5.8),
  evaluated by the modified Lentz method; quantiles by bisection.
- Noncentral t: P(T <= t) = E[Phi(t S - delta)], S = sqrt(chi2_v / v), integrated over the
  chi-square density by the trapezoid rule on a fine grid in u = chi2 (a different rule from
  the Gauss-Legendre quadrature over S that reckon uses).
"""
import math
from statistics import NormalDist

import numpy as np

NORMAL = NormalDist()


def z(p):
    return NORMAL.inv_cdf(p)


def _beta_continued_fraction(a, b, x):
    tiny = 1e-300
    c, d = 1.0, 1.0 - (a + b) * x / (a + 1.0)
    d = 1.0 / (d if abs(d) > tiny else tiny)
    h = d
    for m in range(1, 10000):
        m2 = 2 * m
        for numerator in (m * (b - m) * x / ((a + m2 - 1) * (a + m2)),
                          -(a + m) * (a + b + m) * x / ((a + m2) * (a + m2 + 1))):
            d = 1.0 + numerator * d
            d = 1.0 / (d if abs(d) > tiny else tiny)
            c = 1.0 + numerator / c
            c = c if abs(c) > tiny else tiny
            h *= d * c
        if abs(d * c - 1.0) < 1e-15:
            break
    return h


def incomplete_beta(a, b, x):
    """Regularised incomplete beta I_x(a, b)."""
    if x <= 0:
        return 0.0
    if x >= 1:
        return 1.0
    log_front = (math.lgamma(a + b) - math.lgamma(a) - math.lgamma(b)
                 + a * math.log(x) + b * math.log1p(-x))
    if x < (a + 1) / (a + b + 2):
        return math.exp(log_front) * _beta_continued_fraction(a, b, x) / a
    return 1.0 - math.exp(log_front) * _beta_continued_fraction(b, a, 1 - x) / b


def t_cdf(t, v):
    tail = 0.5 * incomplete_beta(v / 2, 0.5, v / (v + t * t))
    return 1 - tail if t > 0 else tail


def t_quantile(p, v):
    low, high = -1e4, 1e4
    for _ in range(200):
        middle = (low + high) / 2
        if t_cdf(middle, v) < p:
            low = middle
        else:
            high = middle
    return (low + high) / 2


def noncentral_t_cdf(t, v, delta, points=100001):
    # u = chi-square with v degrees of freedom; S = sqrt(u/v).
    mean, sd = v, math.sqrt(2 * v)
    u = np.linspace(max(1e-12, mean - 40 * sd), mean + 40 * sd, points)
    log_density = ((v / 2 - 1) * np.log(u) - u / 2
                   - (v / 2) * math.log(2) - math.lgamma(v / 2))
    density = np.exp(log_density)
    phi = 0.5 * (1 + np.vectorize(math.erf)((t * np.sqrt(u / v) - delta) / math.sqrt(2)))
    return float(np.trapezoid(phi * density, u) / np.trapezoid(density, u))
