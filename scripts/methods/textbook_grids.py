"""Exact values of the textbook grids that reckon's tests check, by numpy linear solves written
from the textbooks' descriptions (independently of reckon's definition files and solver):

- Sutton & Barto (2018), Example 3.5 / Figure 3.2: 5x5 grid, uniform random policy, gamma 0.9;
  every action in A = (0,1) jumps to A' = (4,1) with reward +10, in B = (0,3) to B' = (2,3) with
  +5; a move off the grid stays and pays -1; other moves pay 0. The book prints one decimal.
- Sutton & Barto (2018), Example 4.1 / Figure 4.1: 4x4 grid, corners (0,0) and (3,3) terminal,
  reward -1 on every transition, gamma 1, uniform policy; v_k of the synchronous sweeps from 0
  (printed to one decimal) and v_pi (integers).
- Russell & Norvig (2010), AIMA 3rd ed., Figures 17.2 / 17.3: the 4x3 world, wall at (1,1),
  +1 at (0,3), -1 at (1,3), R = -0.04 in non-terminal states, the intended move with probability
  0.8 and each perpendicular one with 0.1, gamma 1, under the optimal policy of Figure 17.2.
  The book prints three decimals.
- Sutton & Barto (2018), Example 6.2: random walk A..E from C, +1 on leaving to the right,
  uniform steps, gamma 1.
Rows are numbered from the top, as in reckon's "row,col" state names.
"""
import numpy as np

MOVES = {"up": (-1, 0), "down": (1, 0), "left": (0, -1), "right": (0, 1)}
PERPENDICULAR = {"up": ("left", "right"), "down": ("left", "right"), "left": ("up", "down"), "right": ("up", "down")}


def sutton_barto_3_5():
    n = 5
    index = lambda r, c: r * n + c
    P, R = np.zeros((n * n, n * n)), np.zeros(n * n)
    for r in range(n):
        for c in range(n):
            s = index(r, c)
            for dr, dc in MOVES.values():
                if (r, c) == (0, 1):
                    target, reward = index(4, 1), 10
                elif (r, c) == (0, 3):
                    target, reward = index(2, 3), 5
                elif 0 <= r + dr < n and 0 <= c + dc < n:
                    target, reward = index(r + dr, c + dc), 0
                else:
                    target, reward = s, -1
                P[s, target] += 0.25
                R[s] += 0.25 * reward
    return np.linalg.solve(np.eye(n * n) - 0.9 * P, R).reshape(n, n)


def sutton_barto_4_1(sweeps=(1, 2, 3, 10)):
    n = 4
    terminal = {(0, 0), (3, 3)}
    states = [(r, c) for r in range(n) for c in range(n) if (r, c) not in terminal]
    index = {s: i for i, s in enumerate(states)}
    Q, R = np.zeros((len(states), len(states))), np.full(len(states), -1.0)
    for (r, c) in states:
        for dr, dc in MOVES.values():
            nr, nc = (r + dr, c + dc) if 0 <= r + dr < n and 0 <= c + dc < n else (r, c)
            if (nr, nc) not in terminal:
                Q[index[(r, c)], index[(nr, nc)]] += 0.25
    def as_grid(v):
        grid = np.zeros((n, n))
        for s, i in index.items():
            grid[s] = v[i]
        return grid
    values, v = {}, np.zeros(len(states))
    for k in range(1, max(sweeps) + 1):
        v = R + Q @ v
        if k in sweeps:
            values[k] = as_grid(v)
    values["inf"] = as_grid(np.linalg.solve(np.eye(len(states)) - Q, R))
    return values


def aima_4x3():
    rows, cols = 3, 4
    wall, terminal = (1, 1), {(0, 3): 1.0, (1, 3): -1.0}
    policy = {(0, 0): "right", (0, 1): "right", (0, 2): "right",
              (1, 0): "up", (1, 2): "up",
              (2, 0): "up", (2, 1): "left", (2, 2): "left", (2, 3): "left"}
    states = list(policy)
    index = {s: i for i, s in enumerate(states)}
    Q, R = np.zeros((len(states), len(states))), np.full(len(states), -0.04)
    def move(s, action):
        r, c = s[0] + MOVES[action][0], s[1] + MOVES[action][1]
        return s if not (0 <= r < rows and 0 <= c < cols) or (r, c) == wall else (r, c)
    for s, action in policy.items():
        for a, p in ((action, 0.8), (PERPENDICULAR[action][0], 0.1), (PERPENDICULAR[action][1], 0.1)):
            target = move(s, a)
            if target in terminal:
                R[index[s]] += p * terminal[target]
            else:
                Q[index[s], index[target]] += p
    v = np.linalg.solve(np.eye(len(states)) - Q, R)
    return {s: v[i] for s, i in index.items()}


def random_walk():
    Q, R = np.zeros((5, 5)), np.zeros(5)
    for i in range(5):
        if i > 0:
            Q[i, i - 1] = 0.5
        if i < 4:
            Q[i, i + 1] = 0.5
        else:
            R[i] = 0.5
    return np.linalg.solve(np.eye(5) - Q, R)


def show(grid, digits):
    return "\n".join("  " + " ".join(f"{x:{digits + 4}.{digits}f}" for x in row) for row in grid)


if __name__ == "__main__":
    print("Sutton & Barto 2018, Figure 3.2 (exact, four decimals):")
    print(show(sutton_barto_3_5(), 4))
    sweeps = sutton_barto_4_1()
    for k, grid in sweeps.items():
        print(f"Sutton & Barto 2018, Figure 4.1, v_{k}:")
        print(show(grid, 4))
    print("Russell & Norvig, AIMA 3rd ed., Figure 17.3 (exact, four decimals):")
    for s, value in aima_4x3().items():
        print(f"  {s[0]},{s[1]}: {value:.4f}")
    print("Sutton & Barto 2018, Example 6.2 random walk A..E:", " ".join(f"{x:.6f}" for x in random_walk()))
