// The warehouse gridworld of envs/warehouse.json written as a code environment, the way a
// user would write one against src/plugin.ts: the state is a cell index, one uniform a step
// decides a slip, `out` is filled and returned (no allocation per step). The benchmark runs it
// beside the compiled gridworld to price the plug-in interface; its options are the gridworld
// file's own fields. Same transition rules as the compiled form (README "Gridworld").
const MOVES = [[-1, 0], [1, 0], [0, -1], [0, 1]];
const PERPENDICULAR = [[2, 3], [2, 3], [0, 1], [0, 1]];

export default function createGrid({ layout, cells, step_reward, bump_reward = 0, discount, horizon }) {
  const rows = layout.length;
  const cols = layout[0].length;
  const cell = (i) => cells[layout[Math.floor(i / cols)][i % cols]];
  const size = rows * cols;
  const wall = Uint8Array.from({ length: size }, (_, i) => (cell(i).wall ? 1 : 0));
  const terminal = Uint8Array.from({ length: size }, (_, i) => (cell(i).terminal ? 1 : 0));
  const slip = Float64Array.from({ length: size }, (_, i) => cell(i).slip ?? 0);
  const arrival = Float64Array.from({ length: size }, (_, i) => cell(i).reward ?? 0);
  // target[i * 4 + a]: where a move in direction a from cell i lands (i itself when blocked).
  const target = new Int32Array(size * 4);
  for (let i = 0; i < size; i++) {
    for (let a = 0; a < 4; a++) {
      const r = Math.floor(i / cols) + MOVES[a][0];
      const c = (i % cols) + MOVES[a][1];
      target[i * 4 + a] = r >= 0 && r < rows && c >= 0 && c < cols && !wall[r * cols + c] ? r * cols + c : i;
    }
  }
  const startCells = [];
  const startWeights = [];
  for (let i = 0; i < size; i++) if (!wall[i] && cell(i).start) (startCells.push(i), startWeights.push(cell(i).start));
  const totalWeight = startWeights.reduce((x, y) => x + y, 0);

  return {
    actions: ['up', 'down', 'left', 'right'],
    discount,
    horizon,
    reset(rng) {
      let u = rng.uniform() * totalWeight;
      for (let k = 0; k < startCells.length - 1; k++) {
        if (u < startWeights[k]) return startCells[k];
        u -= startWeights[k];
      }
      return startCells[startCells.length - 1];
    },
    step(i, action, rng, out) {
      const q = slip[i];
      const u = rng.uniform();
      const direction = u < 1 - q ? action : u < 1 - q / 2 ? PERPENDICULAR[action][0] : PERPENDICULAR[action][1];
      const next = target[i * 4 + direction];
      out.state = next;
      out.reward = next === i ? step_reward + bump_reward : step_reward + arrival[next];
      out.done = terminal[next] === 1;
      return out;
    },
    stateName: (i) => `${Math.floor(i / cols)},${i % cols}`,
  };
}
