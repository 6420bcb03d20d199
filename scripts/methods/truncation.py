"""Check values of docs/methods.md §2: the truncation bound gamma^H R/(1 - gamma) and the
smallest horizon H >= 1 that keeps it within a tolerance eps (eq. 2.2)."""
import math


def truncation_bound(gamma, horizon, reward):
    return gamma ** horizon * reward / (1 - gamma)


def epsilon_horizon(gamma, reward, eps):
    horizon = max(1, math.ceil(math.log(reward / (eps * (1 - gamma))) / math.log(1 / gamma)))
    # the ceiling of a rounded logarithm may be one off: settle it on the bound itself
    while horizon > 1 and truncation_bound(gamma, horizon - 1, reward) <= eps:
        horizon -= 1
    while truncation_bound(gamma, horizon, reward) > eps:
        horizon += 1
    return horizon


if __name__ == "__main__":
    for gamma, eps in ((0.9, 0.01), (0.99, 0.01), (0.9, 1e-4)):
        h = epsilon_horizon(gamma, 1.0, eps)
        print(f"gamma {gamma}, R 1, eps {eps:g}: H = {h} "
              f"(bound at H {truncation_bound(gamma, h, 1):.6g}, at H-1 {truncation_bound(gamma, h - 1, 1):.6g})")
