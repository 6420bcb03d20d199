// An arrows policy with ε-random moves, as a code policy for grid-module.js (the benchmark's
// counterpart of envs/picker-direct-eps.json): one uniform a step; below ε it also picks the
// random action, above it the arrow of the cell is followed.
const ARROWS = { '^': 0, v: 1, '<': 2, '>': 3 };

export default function createArrowsPolicy({ rows, epsilon }) {
  const cols = rows[0].length;
  const arrow = Int32Array.from({ length: rows.length * cols }, (_, i) => ARROWS[rows[Math.floor(i / cols)][i % cols]] ?? 0);
  return {
    act(i, rng) {
      const u = rng.uniform();
      return u < epsilon ? Math.floor((u / epsilon) * 4) : arrow[i];
    },
  };
}
