import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { convergenceSeries, convergenceSpec, logCheckpoints } from '../../src/report/plots/convergence.js';
import { histogramBins } from '../../src/report/plots/histogram.js';
import { renderSvg } from '../../src/report/plots/svg.js';
import { valueMapCells, valueMapSpec } from '../../src/report/plots/value-map.js';
import { loadEnvironmentFile, loadPolicyFile } from '../../src/definitions/index.js';
import { reckon } from '../cli/run-cli.js';
import { storeTextbookRun, tempStore } from './helpers.js';

describe('plot data', () => {
  it('convergence: running mean and t half-width at each n', () => {
    const series = convergenceSeries(Float64Array.from([1, 2, 3, 4]), 0.95, 100);
    expect(series.map((p) => p.episodes)).toEqual([2, 3, 4]);
    // NIST/SEMATECH e-Handbook, Table 1.3.6.7.2: t(0.975, 1) = 12.706, t(0.975, 3) = 3.182.
    // n = 2: mean 1.5, s = √0.5, half-width 12.706·√0.5/√2 = 6.353.
    expect(series[0].mean).toBe(1.5);
    expect(series[0].high - series[0].mean).toBeCloseTo(6.353, 3);
    // n = 4: mean 2.5, s = √(5/3), half-width 3.182·1.29099/2 = 2.054.
    expect(series[2].mean).toBe(2.5);
    expect(series[2].high - series[2].mean).toBeCloseTo(2.054, 2);
    expect(series[2].mean - series[2].low).toBeCloseTo(series[2].high - series[2].mean, 12);
  });

  it('convergence: checkpoints spaced on a log scale, first 2 and last n', () => {
    const points = logCheckpoints(1_000_000, 160);
    expect(points[0]).toBe(2);
    expect(points.at(-1)).toBe(1_000_000);
    expect(points.length).toBeLessThanOrEqual(160);
    expect(points.length).toBeGreaterThan(140);
    for (let k = 1; k < points.length; k++) expect(points[k]).toBeGreaterThan(points[k - 1]);
  });

  it('histogram: Freedman–Diaconis width, every value counted once', () => {
    const values = Float64Array.from({ length: 100 }, (_, i) => i + 1);
    const bins = histogramBins(values);
    // IQR of 1…100 by Hyndman & Fan definition 7 (R's and NumPy's default): 75.25 − 25.75 = 49.5;
    // Freedman & Diaconis (1981): h = 2·49.5·100^(−1/3) = 21.33, so ⌈99/21.33⌉ = 5 bins
    // (numpy.histogram_bin_edges(range(1, 101), bins='fd') also gives 5, from memory).
    expect(bins).toHaveLength(5);
    expect(bins[0].end - bins[0].start).toBeCloseTo((2 * 49.5) / Math.cbrt(100), 10);
    expect(bins.reduce((s, b) => s + b.count, 0)).toBe(100);
    expect(bins[0].start).toBe(1);
    expect(bins.at(-1)!.end).toBeGreaterThanOrEqual(100);
  });

  it('histogram: whole-number widths centred on lengths', () => {
    const bins = histogramBins(Uint32Array.from([3, 3, 4, 5, 5, 5]), { integer: true });
    expect(bins).toEqual([
      { start: 2.5, end: 3.5, count: 2 },
      { start: 3.5, end: 4.5, count: 1 },
      { start: 4.5, end: 5.5, count: 3 },
    ]);
    expect(histogramBins(Float64Array.from([7, 7, 7]))).toEqual([{ start: 7 - 0.007, end: 7 + 0.007, count: 3 }]);
  });
});

describe('SVG without a browser', () => {
  it('renders a spec to an SVG document with the line and the band', async () => {
    const svg = await renderSvg(convergenceSpec(convergenceSeries(Float64Array.from([1, 3, 2, 4, 3, 5]), 0.95), { title: 'check', level: 0.95, exact: 3 }));
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg).toContain('mark-line');
    expect(svg).toContain('mark-area');
    expect(svg).toContain('mark-rule');
  });

  it('reckon runs plot writes the convergence plot and the value map of a stored run', async () => {
    const storePath = tempStore();
    const id = await storeTextbookRun(storePath, 41, 1000);
    const out = path.join(path.dirname(storePath), 'convergence.svg');
    const result = reckon(['runs', 'plot', id, '--store', storePath, '--out', out]);
    expect(result.stderr).toBe('');
    expect(result.code).toBe(0);
    const svg = readFileSync(out, 'utf8');
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg).toContain(`run ${id}, 1,000 episodes`);
    // The figure is as wide as the plot (560 px and its axis), not stretched by a long title,
    // and no title line is cut short.
    const width = Number(/<svg[^>]* width="(\d+)"/.exec(svg)![1]);
    expect(width).toBeLessThan(700);
    expect(svg).not.toContain('…');
    const map = path.join(path.dirname(storePath), 'map.svg');
    expect(reckon(['runs', 'plot', id, '--store', storePath, '--out', map, '--kind', 'value-map']).code).toBe(0);
    // AIMA Fig. 17.3: the start cell's value under the optimal policy is 0.705 (shown to 2 decimals).
    expect(readFileSync(map, 'utf8')).toContain('>0.71<');
    const bad = reckon(['runs', 'plot', id, '--store', storePath, '--out', map, '--kind', 'pie']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/^reckon: --kind: must be one of convergence, histogram, lengths, value-map/);
  });
});

describe('value map marks', () => {
  const T = path.resolve(__dirname, '../../envs/textbook');

  it('marks the start cell and, when asked, the policy\'s moves: the optimal policy of AIMA Fig. 17.2', async () => {
    const env = await loadEnvironmentFile(path.join(T, 'grid-4x3.json'));
    if (env.built.kind !== 'finite') throw new Error('a gridworld');
    const policy = await loadPolicyFile(path.join(T, 'grid-4x3-optimal.json'), env.built);
    const values = new Float64Array(env.built.mdp.stateCount);
    const plain = valueMapCells(env.built.mdp, values);
    // The world's one start cell is the bottom left (AIMA: square (1,1)).
    expect(plain.filter((c) => c.start).map((c) => [c.row, c.col])).toEqual([[2, 0]]);
    expect(plain.every((c) => c.arrow === null && c.portal === null)).toBe(true);
    // Russell & Norvig, AIMA 3rd ed., Fig. 17.2 (a): the optimal policy, row by row from the top.
    const book = ['→→→+', '↑#↑-', '↑←←←'];
    const cells = valueMapCells(env.built.mdp, values, { policy: policy.built.matrix });
    for (const c of cells) {
      const expected = book[c.row][c.col];
      expect(c.arrow, `${c.row},${c.col}`).toBe(c.wall || c.terminal ? null : expected);
    }
    // With --start, only that cell is a start.
    expect(valueMapCells(env.built.mdp, values, { start: env.built.mdp.stateIndex.get('0,0') }).filter((c) => c.start).map((c) => c.state)).toEqual(['0,0']);
  });

  it('marks portals with the cell they lead to: Sutton & Barto Example 3.5 (A to A\', B to B\')', async () => {
    const env = await loadEnvironmentFile(path.join(T, 'grid-5x5-portals.json'));
    if (env.built.kind !== 'finite') throw new Error('a gridworld');
    const cells = valueMapCells(env.built.mdp, new Float64Array(env.built.mdp.stateCount));
    expect(cells.filter((c) => c.portal !== null).map((c) => [c.char, c.portal])).toEqual([['A', 'a'], ['B', 'b']]);
    const svg = await renderSvg(valueMapSpec(cells, { title: 'portals', subtitle: '' }));
    expect(svg).toContain('↪a');
    expect(svg).toContain('↪b');
  });

  it('runs plot --arrows draws the moves on the value map, and only there', async () => {
    const storePath = tempStore();
    const id = await storeTextbookRun(storePath, 9, 500);
    const dir = path.dirname(storePath);
    const plain = path.join(dir, 'plain.svg');
    const arrows = path.join(dir, 'arrows.svg');
    expect(reckon(['runs', 'plot', id, '--store', storePath, '--out', plain, '--kind', 'value-map']).code).toBe(0);
    expect(reckon(['runs', 'plot', id, '--store', storePath, '--out', arrows, '--kind', 'value-map', '--arrows']).code).toBe(0);
    const [without, withArrows] = [readFileSync(plain, 'utf8'), readFileSync(arrows, 'utf8')];
    expect(without).toContain('>S<');
    expect(without).not.toContain('>→<');
    // Three cells of the book's policy move right along the top row, one at the bottom goes up.
    expect(withArrows.match(/>→</g)).toHaveLength(3);
    expect(withArrows).toContain('>↑<');
    const refused = reckon(['runs', 'plot', id, '--store', storePath, '--out', arrows, '--arrows']);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('--arrows: draws the policy\'s moves on a value map');
  });
});
