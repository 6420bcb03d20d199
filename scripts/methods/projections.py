"""Check values of docs/methods.md §5 and §7.2: episodes for a target half-width (normal, the t
fixed point, Hoeffding) and the paired sample size with the exact power of the paired t test."""
import math
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from distributions import noncentral_t_cdf, t_quantile, z  # noqa: E402


def normal_episodes(s, eps, level):
    return max(2, math.ceil((z(1 - (1 - level) / 2) * s / eps) ** 2))


def t_episodes(s, eps, level):
    """Smallest n with t_{1-alpha/2, n-1} s/sqrt(n) <= eps, searched directly (not by the
    fixed-point iteration reckon uses, so the two can disagree if the iteration is wrong)."""
    p = 1 - (1 - level) / 2
    n = 2
    while t_quantile(p, n - 1) * s / math.sqrt(n) > eps:
        n = n * 2 if t_quantile(p, 2 * n - 1) * s / math.sqrt(2 * n) > eps else n + 1
    return n


def hoeffding_episodes(width, alpha, eps):
    return math.ceil(width ** 2 * math.log(2 / alpha) / (2 * eps ** 2))


def paired_power(n, effect, sigma, level):
    df = n - 1
    critical = t_quantile(1 - (1 - level) / 2, df)
    ncp = effect * math.sqrt(n) / sigma
    return 1 - noncentral_t_cdf(critical, df, ncp) + noncentral_t_cdf(-critical, df, ncp)


def paired_sizes(effect, sigma, level, power):
    alpha = 1 - level
    scale = (sigma / effect) ** 2
    z_pairs = math.ceil((z(1 - alpha / 2) + z(power)) ** 2 * scale)
    n = z_pairs
    for _ in range(100):
        following = math.ceil((t_quantile(1 - alpha / 2, n - 1) + t_quantile(power, n - 1)) ** 2 * scale)
        if following == n:
            break
        n = following
    return z_pairs, n


if __name__ == "__main__":
    print(f"s 1, eps 0.1, 95%: normal {normal_episodes(1, 0.1, 0.95)}, t {t_episodes(1, 0.1, 0.95)}")
    print(f"s 0.3, eps 0.01, 95%: normal {normal_episodes(0.3, 0.01, 0.95)}, t {t_episodes(0.3, 0.01, 0.95)}")
    print(f"Hoeffding, b - a 1, alpha 0.05, eps 0.01: {hoeffding_episodes(1, 0.05, 0.01)}")
    z_pairs, t_pairs = paired_sizes(0.1, 0.5, 0.95, 0.8)
    print(f"paired, delta 0.1, sigma_D 0.5, power 0.8, 95%: {z_pairs} (z), {t_pairs} (t), "
          f"exact power at {t_pairs}: {paired_power(t_pairs, 0.1, 0.5, 0.95):.4f}, "
          f"at {t_pairs - 1}: {paired_power(t_pairs - 1, 0.1, 0.5, 0.95):.4f}")
