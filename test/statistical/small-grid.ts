/**
 * The small slippery grid the statistical tests sample from: intended move 0.8, each
 * perpendicular 0.1 (as in Russell & Norvig's 4×3 world), a −0.04 step cost, a +1 and a −1
 * terminal, discounted so its exact return bounds are tight; and a table policy heading for +1.
 */
export const smallGrid = {
  kind: 'gridworld',
  discount: 0.95,
  horizon: 60,
  step_reward: -0.04,
  layout: ['...+', '.#.-', '....'],
  cells: { '.': { slip: 0.2 }, '#': { wall: true }, '+': { terminal: true, reward: 1 }, '-': { terminal: true, reward: -1 } },
};

export const towardsGoal = {
  kind: 'table',
  default: 'up',
  states: { '0,0': 'right', '0,1': 'right', '0,2': 'right', '2,1': 'left', '2,2': 'left', '2,3': 'left' },
};

export const inlineSource = { label: 'inline', baseDir: process.cwd() };
