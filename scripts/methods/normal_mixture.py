"""Check values of docs/methods.md §6.3: the normal-mixture half-width (6.1), the tuning ratio
r* = rho/t* that solves ln((1 + r)/(r alpha^2)) = 1/r (6.2), and the closed-form episodes (6.3)."""
import math


def half_width(t, sigma, alpha, rho):
    return (sigma / t) * math.sqrt((t + rho) * math.log((t + rho) / (rho * alpha ** 2)))


def tuned_ratio(alpha):
    """Root of ln((1 + r)/(r alpha^2)) - 1/r by bisection on a log scale."""
    low, high = 1e-12, 1e6
    for _ in range(300):
        middle = math.sqrt(low * high)
        if math.log((1 + middle) / (middle * alpha ** 2)) - 1 / middle < 0:
            low = middle
        else:
            high = middle
    return math.sqrt(low * high)


def episodes(eps, sigma, alpha):
    r = tuned_ratio(alpha)
    return (sigma / eps) ** 2 * (1 + r) * math.log((1 + r) / (r * alpha ** 2))


if __name__ == "__main__":
    r = tuned_ratio(0.05)
    print(f"r* for alpha 0.05: {r:.6f} (rho for t* = 1000: {1000 * r:.2f})")
    # a direct minimisation over a grid, as an independent check of the root
    grid = [10 ** (k / 10000) for k in range(-30000, 10000)]
    best = min(grid, key=lambda q: (1 + q) * math.log((1 + q) / (q * 0.05 ** 2)))
    print(f"grid minimiser of (1 + r) ln((1 + r)/(r alpha^2)): {best:.5f}")
    print(f"half-width, sigma 1, t 1000, alpha 0.05, rho 121.77: {half_width(1000, 1, 0.05, 121.77):.6f}")
    print(f"episodes for eps 0.095979, sigma 1: {episodes(0.095979, 1, 0.05):.2f}")
