"""Check values of docs/methods.md §4: Hoeffding and empirical-Bernstein half-widths, the BCa
acceleration for the mean (jackknife sums against the closed form g1/(6 sqrt n)), and the
normal quantiles."""
import math
import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from distributions import z  # noqa: E402


def hoeffding_half_width(n, width, alpha):
    """Hoeffding (1963), Theorem 2, two-sided."""
    return width * math.sqrt(math.log(2 / alpha) / (2 * n))


def bernstein_half_width(n, variance, width, alpha):
    """Maurer & Pontil (2009), Theorem 4, with ln(4/alpha) for two sides."""
    log_term = math.log(4 / alpha)
    return math.sqrt(2 * variance * log_term / n) + 7 * width * log_term / (3 * (n - 1))


def acceleration_jackknife(x):
    """Efron & Tibshirani (1993) eq. 14.15, by the leave-one-out means."""
    x = np.asarray(x, dtype=float)
    n = len(x)
    leave_one_out = (x.sum() - x) / (n - 1)
    d = leave_one_out.mean() - leave_one_out
    return (d ** 3).sum() / (6 * ((d ** 2).sum()) ** 1.5)


def acceleration_skewness(x):
    """Closed form for the mean: g1/(6 sqrt n), g1 the biased sample skewness."""
    x = np.asarray(x, dtype=float)
    d = x - x.mean()
    g1 = (d ** 3).mean() / ((d ** 2).mean()) ** 1.5
    return g1 / (6 * math.sqrt(len(x)))


if __name__ == "__main__":
    print(f"Hoeffding half-width, n 1000, b - a 1, alpha 0.05: {hoeffding_half_width(1000, 1, 0.05):.6f}")
    print(f"empirical-Bernstein half-width, n 1000, s^2 0.1, [0, 1], alpha 0.05: {bernstein_half_width(1000, 0.1, 1, 0.05):.6f}")
    sample = [1, 2, 3, 4, 10]
    print(f"BCa acceleration for {sample}: jackknife {acceleration_jackknife(sample):.6f}, "
          f"g1/(6 sqrt n) {acceleration_skewness(sample):.6f}")
    print(f"z 0.975 = {z(0.975):.6f}, z 0.995 = {z(0.995):.6f}")
