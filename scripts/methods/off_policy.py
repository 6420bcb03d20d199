"""Check values of docs/methods.md §13 (off-policy evaluation), from the published formulas alone.

The model: 2 states, 2 actions, horizon 3, discount 0.9, start in state 0; deterministic rewards
r(0,0)=0, r(0,1)=0.2, r(1,0)=0.5, r(1,1)=1; P(next=0 | s,a) = 0.8, 0.3, 0.6, 0.1 for (0,0),(0,1),(1,0),(1,1);
behaviour mu(1|s) = 0.3, 0.5; target pi(1|s) = 0.8, 0.9.

Prints
  * the exact target and behaviour values by backward induction and by enumerating all 32 trajectories;
  * E_mu[W], E_mu[W^2] and the asymptotic Kish ESS/n = 1/E_mu[W^2];
  * Q^pi_t(s,a) for t = 0, 1, 2;
  * exact expectations of IS, WIS, PDIS, CWPDIS, DR and WDR (Q-hat = Q^pi) at n = 1, 2, 3 by enumeration;
  * the estimators on a 3-episode log (tests/fixtures: three-episodes.jsonl);
  * the Thomas-Theocharous-Ghavamzadeh (2015) lower bound on two fixed samples;
  * the one-sided betting lower bound for a non-negative mean on one of them;
  * by simulation, the bias of DR at n = 5 with a model fitted on the same episodes and cross-fitted.
Run from the repository root: python3 scripts/methods/off_policy.py (a few seconds)."""
import itertools
import numpy as np

GAMMA, H, S0 = 0.9, 3, 0
P = np.array([[[0.8, 0.2], [0.3, 0.7]],
              [[0.6, 0.4], [0.1, 0.9]]])          # P[s, a, s']
R = np.array([[0.0, 0.2], [0.5, 1.0]])            # r(s, a)
MU = np.array([[0.7, 0.3], [0.5, 0.5]])           # behaviour mu(a|s)
PI = np.array([[0.2, 0.8], [0.1, 0.9]])           # target pi(a|s)
DISC = GAMMA ** np.arange(H)


def q_table(policy):
    """Q_t(s,a) for t = 0..H-1 by backward induction, V_H = 0."""
    q = np.zeros((H, 2, 2))
    v_next = np.zeros(2)
    for t in range(H - 1, -1, -1):
        q[t] = R + GAMMA * P @ v_next
        v_next = (policy * q[t]).sum(1)
    return q


def value(policy):
    return float((policy[S0] * q_table(policy)[0, S0]).sum())


# every trajectory (s0, a0, s1, a1, s2, a2) with its probability under the behaviour
TRAJ, PROB = [], []
for a0, s1, a1, s2, a2 in itertools.product(range(2), repeat=5):
    s, a = [S0, s1, s2], [a0, a1, a2]
    TRAJ.append((s, a))
    PROB.append(MU[S0, a0] * P[S0, a0, s1] * MU[s1, a1] * P[s1, a1, s2] * MU[s2, a2])
PROB = np.array(PROB)
ST = np.array([t[0] for t in TRAJ])
AC = np.array([t[1] for t in TRAJ])
REW = R[ST, AC]
RHO = np.cumprod(PI[ST, AC] / MU[ST, AC], axis=1)   # rho_{0:t}
G = (REW * DISC).sum(1)
W = RHO[:, -1]
QPI = q_table(PI)
QSA = QPI[np.arange(H)[None, :], ST, AC]
VS = (PI[ST] * QPI[np.arange(H)[None, :], ST]).sum(-1)


def estimators(idx):
    """IS, WIS, PDIS, CWPDIS, DR, WDR on trajectory multisets idx (..., n); Q-hat = Q^pi."""
    n = idx.shape[-1]
    rho, r, w, g, q, v = RHO[idx], REW[idx], W[idx], G[idx], QSA[idx], VS[idx]
    out = {"IS": (w * g).mean(-1)}
    out["WIS"] = (w * g).sum(-1) / w.sum(-1)
    out["PDIS"] = (DISC * rho * r).sum(-1).mean(-1)
    d = rho.sum(-2)                                       # per-t normaliser
    out["CWPDIS"] = (DISC * (rho * r).sum(-2) / d).sum(-1)
    prev = np.concatenate([np.ones(rho.shape[:-1] + (1,)), rho[..., :-1]], -1)
    out["DR"] = (DISC * (rho * (r - q) + prev * v)).sum(-1).mean(-1)
    wt = rho / d[..., None, :]
    wprev = np.concatenate([np.full(rho.shape[:-1] + (1,), 1.0 / n), wt[..., :-1]], -1)
    out["WDR"] = (DISC * (wt * (r - q) + wprev * v)).sum(-1).sum(-1)
    return out


def hcope_lower(x, c, delta):
    """Thomas, Theocharous & Ghavamzadeh (AAAI 2015), Theorem 1 with one threshold c for every i."""
    x = np.asarray(x, float)
    n = len(x)
    y = np.minimum(x, c) / c
    k = n / c                                             # sum_i 1/c_i
    spread = n * np.sum(y ** 2) - np.sum(y) ** 2
    return (y.sum() / k - 7 * n * np.log(2 / delta) / (3 * (n - 1) * k)
            - np.sqrt(2 * np.log(2 / delta) / (n - 1) * spread) / k)


def betting_lower(x, alpha=0.05, c=0.5, tol=1e-10):
    """Lower confidence bound for E[X], X >= 0 and no upper bound: the smallest m whose capital
    prod_t (1 + min(lam_t, c/m)(x_t - m)) never reaches 1/alpha; lam_t the predictable plug-in bet
    sqrt(2 log(1/alpha) / (n s2_{t-1})) with s2 the running variance started at 1/4 (fixed-n tuning)."""
    x = np.asarray(x, float)
    n = len(x)
    t = np.arange(1, n + 1)
    mean = (0.5 + np.cumsum(x)) / (t + 1)
    var = (0.25 + np.cumsum((x - mean) ** 2)) / (t + 1)
    var_prev = np.concatenate(([0.25], var[:-1]))
    lam = np.sqrt(2 * np.log(1 / alpha) / (n * var_prev))
    threshold = np.log(1 / alpha)

    def log_capital_max(m):
        return np.max(np.cumsum(np.log1p(np.minimum(lam, c / m) * (x - m))))

    lo, hi = 1e-12, max(x.max(), 1e-9)
    if log_capital_max(lo) < threshold:
        return 0.0
    while hi - lo > tol:
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if log_capital_max(mid) >= threshold else (lo, mid)
    return lo


def fitted_q(idx):
    """Q-hat_t from the tabular maximum-likelihood model of the trajectories idx (C, n): mean reward and
    next-state frequencies per (s, a); unvisited pairs get reward 0 and uniform next states."""
    c = idx.shape[0]
    visits = np.zeros((c, 2, 2)); rsum = np.zeros((c, 2, 2)); moves = np.zeros((c, 2, 2, 2))
    for t in range(H):
        s, a = ST[idx, t], AC[idx, t]
        for si in range(2):
            for ai in range(2):
                hit = (s == si) & (a == ai)
                visits[:, si, ai] += hit.sum(1)
                rsum[:, si, ai] += (hit * R[si, ai]).sum(1)
                if t < H - 1:
                    nxt = ST[idx, t + 1]
                    for sp in range(2):
                        moves[:, si, ai, sp] += (hit & (nxt == sp)).sum(1)
    rhat = np.where(visits > 0, rsum / np.maximum(visits, 1), 0.0)
    total = moves.sum(-1, keepdims=True)
    phat = np.where(total > 0, moves / np.maximum(total, 1), 0.5)
    q = np.zeros((c, H, 2, 2)); v_next = np.zeros((c, 2))
    for t in range(H - 1, -1, -1):
        q[:, t] = rhat + GAMMA * np.einsum("csap,cp->csa", phat, v_next)
        v_next = (PI[None] * q[:, t]).sum(-1)
    return q


def dr_with(idx, q):
    """DR on trajectories idx (C, n) with a per-row Q-hat q (C, H, 2, 2)."""
    c, n = idx.shape
    rows = np.arange(c)[:, None, None]; tt = np.arange(H)[None, None, :]
    qsa = q[rows, tt, ST[idx], AC[idx]]
    vs = (PI[ST[idx]] * q[rows, tt, ST[idx]]).sum(-1)
    rho = RHO[idx]
    prev = np.concatenate([np.ones((c, n, 1)), rho[..., :-1]], -1)
    return (DISC * (rho * (REW[idx] - qsa) + prev * vs)).sum(-1).mean(-1)


if __name__ == "__main__":
    print(f"V^pi(s0) = {value(PI):.7f} by backward induction, {float((PROB * G * W).sum()):.7f} by enumeration")
    print(f"V^mu(s0) = {value(MU):.7f} by backward induction, {float((PROB * G).sum()):.7f} by enumeration")
    ew2 = float((PROB * W ** 2).sum())
    print(f"E_mu[W] = {float((PROB * W).sum()):.9f}, E_mu[W^2] = {ew2:.6f}, asymptotic Kish ESS/n = {1 / ew2:.6f}")
    for t in range(H):
        print(f"Q^pi_{t} = {np.round(QPI[t], 6).tolist()}")
    for n in (1, 2, 3):
        combos = np.array(list(itertools.product(range(len(PROB)), repeat=n)))
        pr = np.prod(PROB[combos], axis=1)
        means = {k: float((pr * v).sum()) for k, v in estimators(combos).items()}
        print(f"n = {n}: " + "  ".join(f"E[{k}] = {m:.6f}" for k, m in means.items()))

    episodes = [[(0, 1), (1, 1), (1, 0)], [(0, 0), (0, 1), (1, 1)], [(0, 1), (0, 1), (0, 1)]]
    index = [next(j for j, (s, a) in enumerate(TRAJ) if s == [p[0] for p in e] and a == [p[1] for p in e]) for e in episodes]
    est = estimators(np.array(index))
    w3 = W[index]
    print("3-episode log: G =", np.round(G[index], 6).tolist(), " W =", np.round(w3, 6).tolist())
    print("  " + "  ".join(f"{k} = {float(v):.6f}" for k, v in est.items()) + f"  Kish ESS = {w3.sum() ** 2 / (w3 ** 2).sum():.6f}")

    x10 = [0.0, 0.0, 0.35, 0.8, 1.6, 0.0, 2.9, 0.45, 0.1, 5.2]
    for c in (1.0, 2.0, 5.2):
        print(f"HCOPE lower bound, 10 values, delta 0.05, c = {c}: {hcope_lower(x10, c, 0.05):.6f}")
    phi = 0.6180339887498949
    x = 4 * ((np.arange(1, 1001) * phi) % 1.0) ** 3
    print(f"x_i = 4((i phi) mod 1)^3, i = 1..1000 (mean {x.mean():.6f}): HCOPE c = 2 {hcope_lower(x, 2.0, 0.05):.6f}, "
          f"c = 4 {hcope_lower(x, 4.0, 0.05):.6f}; one-sided betting lower bound (alpha 0.05, c 0.5) {betting_lower(x):.6f}")

    # DR with the model fitted on the same episodes vs on the other fold (2-fold cross-fitting), n = 5
    rng = np.random.default_rng(11)
    reps, n = 100000, 5
    idx = rng.choice(len(PROB), size=(reps, n), p=PROB)
    same = dr_with(idx, fitted_q(idx))
    a, b = idx[:, :2], idx[:, 2:]
    cross = (2 * dr_with(a, fitted_q(b)) + 3 * dr_with(b, fitted_q(a))) / n
    v = value(PI)
    for name, est in (("same-data model", same), ("2-fold cross-fitted", cross)):
        print(f"DR, n = 5, {name}: bias {est.mean() - v:+.4f} (standard error {est.std() / np.sqrt(reps):.4f}), "
              f"RMSE {np.sqrt(np.mean((est - v) ** 2)):.3f}; {reps} simulated logs, seed 11")
