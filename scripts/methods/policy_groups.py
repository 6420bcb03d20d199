"""Check values and simulated figures of docs/methods.md §15 (policy groups: members trained
with different seeds, each evaluated on episodes). NumPy only.

1. the one-way random-effects table of 3 seeds x 4 episodes (Cochran 1977, ch. 10);
2. the episodes per member n* = sqrt((c_seed/c_episode) sigma_w^2/sigma_b^2) for three cases;
3. the shared-noise term: members on common random numbers, where s^2(member means)/K alone
   understates Var(group mean) and adding the mean covariance c of the members' episode means
   restores it; coverage of the t_{K-1} interval with and without the term, and of the naive
   interval that pools all episodes, on normal data (R replications, seed 15).
Run: python3 scripts/methods/policy_groups.py   (about 40 s)
"""
import math
import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from distributions import t_quantile  # noqa: E402


def table(Y):
    K, n = Y.shape
    m = Y.mean(1)
    gm = m.mean()
    msb = n * ((m - gm) ** 2).sum() / (K - 1)
    msw = ((Y - m[:, None]) ** 2).sum() / (K * (n - 1))
    sb2 = max((msb - msw) / n, 0.0)
    icc = sb2 / (sb2 + msw)
    se = math.sqrt(msb / (K * n))
    return gm, msb, msw, sb2, icc, se, t_quantile(0.975, K - 1) * se, Y.std(ddof=1) / math.sqrt(K * n)


Y = np.array([[1.0, 2, 3, 2], [4, 5, 3, 4], [2, 3, 1, 2]])
names = ['grand mean', 'MSB', 'MSW', 'sigma_b^2', 'ICC', 'SE', 't_2 half-width', 'naive SE']
print('3 x 4 table: ' + ', '.join(f'{k} {v:.6f}' for k, v in zip(names, table(Y))))

for ratio, sb, sw in [(1000, 0.1, 0.5), (100, 0.1, 0.5), (1000, 0.3, 0.3)]:
    print(f'n* for c_seed/c_episode = {ratio}, sigma_b = {sb}, sigma_w = {sw}: {math.sqrt(ratio * sw * sw / (sb * sb)):.1f}')


def shared_noise_case(K, n, sb, sw, rho, R, rng):
    """Episode noise e_kj = sqrt(rho) u_j + sqrt(1 - rho) v_kj: a common part u_j that every
    member meets in episode j (common random numbers) and a member's own part v_kj."""
    tq = t_quantile(0.975, K - 1)
    truth_var = sb * sb / K + sw * sw * (rho + (1 - rho) / K) / n
    plain, corrected = [], []
    cover = {'plain t': 0, 'with shared term, t_(K-1)': 0, 'with shared term, Satterthwaite df': 0, 'naive pooled': 0}
    for _ in range(R):
        b = sb * rng.standard_normal(K)
        u = rng.standard_normal(n)
        e = sw * (math.sqrt(rho) * u[None, :] + math.sqrt(1 - rho) * rng.standard_normal((K, n)))
        Yk = b[:, None] + e
        means = Yk.mean(1)
        gm = means.mean()
        v_plain = means.var(ddof=1) / K
        z = Yk.mean(0)
        c = (K * K * z.var(ddof=1) - Yk.var(axis=1, ddof=1).sum()) / (n * K * (K - 1))
        v_corr = max(v_plain + c, 0.0)
        plain.append(v_plain)
        corrected.append(v_corr)
        cover['plain t'] += abs(gm) <= tq * math.sqrt(v_plain)
        cover['with shared term, t_(K-1)'] += abs(gm) <= tq * math.sqrt(v_corr)
        cs = max(c, 0.0)
        df = (v_plain + cs) ** 2 / (v_plain ** 2 / (K - 1) + cs ** 2 / (n - 1)) if v_plain + cs > 0 else K - 1
        cover['with shared term, Satterthwaite df'] += abs(gm) <= t_quantile(0.975, df) * math.sqrt(v_corr)
        cover['naive pooled'] += abs(gm) <= 1.959964 * Yk.std(ddof=1) / math.sqrt(K * n)
    print(f'K = {K}, n = {n}, sigma_b = {sb}, sigma_w = {sw}, shared share of the episode noise {rho}, {R} replications:')
    print(f'  Var(group mean) {truth_var:.3e}; mean estimate: plain {np.mean(plain):.3e}, with the shared term {np.mean(corrected):.3e}')
    print('  95% coverage: ' + ', '.join(f'{k} {v / R:.3f}' for k, v in cover.items()))


rng = np.random.default_rng(15)
shared_noise_case(5, 100, 0.1, 0.5, 0.0, 2000, rng)
shared_noise_case(5, 100, 0.1, 0.5, 0.8, 2000, rng)
shared_noise_case(5, 100, 0.02, 0.5, 0.8, 2000, rng)
