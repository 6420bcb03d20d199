import { describe, expect, it } from 'vitest';
import { horizonValues, returnBounds } from '../../src/exact/index.js';
import { buildMdp } from './build-mdp.js';
import { type RandomCase, randomCase } from './random-mdps.js';

// The recursions may stop before H when the remaining steps provably cannot matter. Reference:
// all H steps of the textbook recursions (Sutton & Barto 2018, eq. 4.5 from 0; docs/methods.md §9 for
// the second moment; min/max dynamic programming for the bounds), written out here straight
// from the transition list (common practice).

function plainRecursion(c: RandomCase, horizon: number) {
  const { spec, table } = c;
  const dead = new Set(spec.terminal ?? []);
  let v = new Float64Array(spec.stateCount);
  let m = new Float64Array(spec.stateCount);
  let lo = new Float64Array(spec.stateCount);
  let hi = new Float64Array(spec.stateCount);
  for (let h = 0; h < horizon; h++) {
    const nv = new Float64Array(spec.stateCount);
    const nm = new Float64Array(spec.stateCount);
    const nlo = new Float64Array(spec.stateCount).fill(Infinity);
    const nhi = new Float64Array(spec.stateCount).fill(-Infinity);
    for (const t of spec.transitions) {
      if (dead.has(t.from)) continue;
      const w = table[t.from][t.action] * t.p;
      const [vj, mj, lj, hj] = dead.has(t.to) ? [0, 0, 0, 0] : [v[t.to], m[t.to], lo[t.to], hi[t.to]];
      nv[t.from] += w * (t.reward + spec.discount * vj);
      nm[t.from] += w * (t.reward ** 2 + 2 * spec.discount * t.reward * vj + spec.discount ** 2 * mj);
      if (w > 0) {
        nlo[t.from] = Math.min(nlo[t.from], t.reward + spec.discount * lj);
        nhi[t.from] = Math.max(nhi[t.from], t.reward + spec.discount * hj);
      }
    }
    for (const s of dead) {
      nlo[s] = 0;
      nhi[s] = 0;
    }
    [v, m, lo, hi] = [nv, nm, nlo, nhi];
  }
  return { v, m, lo, hi };
}

const cases = [
  { seed: 7001, discount: 0.99, canEnd: false, horizon: 6000 },
  { seed: 7002, discount: 0.9, canEnd: false, horizon: 3000 },
  { seed: 7003, discount: 1, canEnd: true, horizon: 3000 },
  { seed: 7004, discount: 1, canEnd: true, horizon: 3000 },
];

describe('early stopping changes nothing that matters', () => {
  it.each(cases)('seed $seed, γ = $discount, H = $horizon: value and second moment', ({ seed, discount, canEnd, horizon }) => {
    const c = randomCase(seed, discount, canEnd);
    const mdp = buildMdp({ ...c.spec, horizon });
    const fast = horizonValues(mdp, c.policy);
    const slow = plainRecursion(c, horizon);
    for (let s = 0; s < mdp.stateCount; s++) {
      expect(Math.abs(fast.value[s] - slow.v[s])).toBeLessThan(1e-10 * Math.max(1, Math.abs(slow.v[s])));
      expect(Math.abs(fast.secondMoment[s] - slow.m[s])).toBeLessThan(1e-10 * Math.max(1, Math.abs(slow.m[s])));
    }
  });

  it.each(cases.slice(0, 2))('seed $seed, γ = $discount, H = $horizon: return bounds contain the exact ones, barely wider', ({ seed, discount, horizon }) => {
    const c = randomCase(seed, discount);
    const mdp = buildMdp({ ...c.spec, horizon });
    const [low, high] = returnBounds(mdp, c.policy);
    const slow = plainRecursion(c, horizon);
    expect(low).toBeLessThanOrEqual(slow.lo[0]);
    expect(high).toBeGreaterThanOrEqual(slow.hi[0]);
    expect(slow.lo[0] - low).toBeLessThan(1e-10);
    expect(high - slow.hi[0]).toBeLessThan(1e-10);
  });
});
