"""Simulated figures of docs/methods.md §6.1 and §11: returns Bernoulli(0.02), a run that stops as
soon as the half-width is at most 0.01 (checked after every episode), 95 %. For each rule: the
share of replications whose interval at the stop covers mu = 0.02, and the median stopping
episode. Rules: the empirical-Bernstein sequence (§6.2), Chow-Robbins (§6.4, n0 = 10), and a
naive fixed-n t interval checked from n0 = 10 on.

  python3 scripts/methods/optional_stopping.py [replications] [seed]   (defaults 2000, 1)
"""
import math
import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from distributions import t_quantile, z  # noqa: E402
from empirical_bernstein import sequence  # noqa: E402

MU, EPSILON, ALPHA, MAX_STEPS, BATCH = 0.02, 0.01, 0.05, 8000, 250


def first_true(condition):
    """Index of the first True per row, or -1."""
    hit = condition.any(axis=1)
    return np.where(hit, condition.argmax(axis=1), -1)


def running_moments(x):
    n = np.arange(1, x.shape[1] + 1, dtype=float)
    sums = np.cumsum(x, axis=1)
    mean = sums / n
    with np.errstate(invalid="ignore", divide="ignore"):
        variance = (np.cumsum(x * x, axis=1) - n * mean ** 2) / (n - 1)   # 0/1 data: exact enough
    return n, mean, np.maximum(variance, 0.0)


def main():
    replications = int(sys.argv[1]) if len(sys.argv) > 1 else 2000
    rng = np.random.default_rng(int(sys.argv[2]) if len(sys.argv) > 2 else 1)
    t_critical = np.full(MAX_STEPS, np.inf)
    for n in range(10, MAX_STEPS + 1):
        t_critical[n - 1] = t_quantile(1 - ALPHA / 2, n - 1) if n < 4000 else z(1 - ALPHA / 2)
    z_critical = z(1 - ALPHA / 2)
    results = {"empirical-Bernstein": ([], []), "Chow-Robbins": ([], []), "naive t from n0 = 10": ([], [])}
    for start in range(0, replications, BATCH):
        x = (rng.random((min(BATCH, replications - start), MAX_STEPS)) < MU).astype(float)
        rows = np.arange(x.shape[0])
        n, mean, variance = running_moments(x)

        low, high = sequence(x, alpha=ALPHA)
        stop = first_true(np.maximum(high - low, 0) / 2 <= EPSILON)
        covered = (low[rows, stop] <= MU) & (MU <= high[rows, stop])
        results["empirical-Bernstein"][0].append(np.where(stop >= 0, covered, False))
        results["empirical-Bernstein"][1].append(stop + 1)

        chow = (n >= 10) & (n >= (z_critical / EPSILON) ** 2 * (variance + 1 / n))
        stop = first_true(chow)
        covered = np.abs(mean[rows, stop] - MU) <= EPSILON
        results["Chow-Robbins"][0].append(covered)
        results["Chow-Robbins"][1].append(stop + 1)

        with np.errstate(invalid="ignore"):
            half = t_critical * np.sqrt(variance / n)
        stop = first_true(half <= EPSILON)
        covered = np.abs(mean[rows, stop] - MU) <= half[rows, stop]
        results["naive t from n0 = 10"][0].append(covered)
        results["naive t from n0 = 10"][1].append(stop + 1)

    print(f"Bernoulli({MU}) returns, stop at half-width <= {EPSILON}, {replications} replications")
    for name, (covered, stops) in results.items():
        covered, stops = np.concatenate(covered), np.concatenate(stops)
        assert (stops > 0).all(), f"{name}: some replication did not stop within {MAX_STEPS} episodes"
        share = covered.mean()
        sd = math.sqrt(share * (1 - share) / replications)
        print(f"  {name:22s} coverage {share:.3f} (binomial sd {sd:.3f}), median stop {int(np.median(stops))}")


if __name__ == "__main__":
    main()
