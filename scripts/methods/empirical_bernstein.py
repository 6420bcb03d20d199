"""The predictable plug-in empirical-Bernstein confidence sequence of docs/methods.md §6.2
(Waudby-Smith & Ramdas 2024), re-implemented with numpy from the formulas, vectorised over
replications. Run directly, it prints the check value C_100 of the alternating sequence
0, 1, 0, 1, ... (c = 1/2, no intersections)."""
import math

import numpy as np


def sequence(x, alpha=0.05, cap=0.5, intersect=True):
    """x: array (replications, t) of values in [0, 1]. Returns (low, high), each (replications, t):
    the interval after every observation."""
    x = np.atleast_2d(np.asarray(x, dtype=float))
    steps = x.shape[1]
    t = np.arange(1, steps + 1, dtype=float)
    log_term = math.log(2 / alpha)
    sums = np.cumsum(x, axis=1)
    mean = (0.5 + sums) / (t + 1)                                  # mu_hat_t
    previous_mean = np.concatenate([np.full((x.shape[0], 1), 0.5), mean[:, :-1]], axis=1)
    squared = np.cumsum((x - mean) ** 2, axis=1)                   # sum_{i<=t} (x_i - mu_hat_i)^2
    previous_squared = np.concatenate([np.zeros((x.shape[0], 1)), squared[:, :-1]], axis=1)
    previous_variance = (0.25 + previous_squared) / t              # sigma_hat^2_{t-1}
    lam = np.minimum(np.sqrt(2 * log_term / (previous_variance * t * np.log1p(t))), cap)
    v = 4 * (x - previous_mean) ** 2
    psi = (-np.log1p(-lam) - lam) / 4
    sum_lam = np.cumsum(lam, axis=1)
    centre = np.cumsum(lam * x, axis=1) / sum_lam
    margin = (log_term + np.cumsum(v * psi, axis=1)) / sum_lam
    low, high = centre - margin, centre + margin
    if intersect:
        low = np.maximum.accumulate(np.maximum(low, 0.0), axis=1)
        high = np.minimum.accumulate(np.minimum(high, 1.0), axis=1)
    return low, high


if __name__ == "__main__":
    alternating = np.arange(100) % 2
    low, high = sequence(alternating, intersect=False)
    print(f"alternating 0, 1, ...: C_100 = [{low[0, -1]:.5f}, {high[0, -1]:.5f}]")
