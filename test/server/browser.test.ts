import { existsSync, mkdirSync, mkdtempSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { readJson, ROOT, storeTextbookRun, tempStore } from './helpers.js';

const CHROMIUM = '/usr/bin/chromium';
const FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run'];
// The README's screenshot is this test's: RECKON_UPDATE_SCREENSHOT=1 writes it to docs/;
// otherwise it goes to a temporary folder, so a test run leaves the tree as it was.
const SCREENSHOT =
  process.env.RECKON_UPDATE_SCREENSHOT === '1'
    ? path.join(ROOT, 'docs', 'review-server.png')
    : path.join(mkdtempSync(path.join(tmpdir(), 'reckon-screenshot-')), 'review-server.png');
const haveChromium = existsSync(CHROMIUM);

// CI must run this test (.ci/run installs Chromium); elsewhere it may be skipped, saying why.
if (!haveChromium && process.env.CI === 'true') {
  throw new Error(`${CHROMIUM} is missing; CI must install Debian's chromium package (see .ci/run)`);
}
if (!haveChromium) console.warn(`test/server/browser.test.ts skipped: ${CHROMIUM} not found (apt-get install chromium)`);

describe.skipIf(!haveChromium)('the review page in headless Chromium', () => {
  let app: FastifyInstance;
  let base: string;
  let browser: import('playwright-core').Browser;

  beforeAll(async () => {
    const storePath = tempStore();
    await storeTextbookRun(storePath, 31, 3000);
    app = await buildApp({ storePath, toolVersion: 'test', workers: 1 });
    base = await app.listen({ host: '127.0.0.1', port: 0 });
    const { chromium } = await import('playwright-core');
    browser = await chromium.launch({ executablePath: CHROMIUM, args: FLAGS });
  });
  afterAll(async () => {
    await browser?.close();
    await app?.close();
  });

  it('submits an evaluation through the form, follows it, and draws its plots with data', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 1500 } });
    const outside: string[] = [];
    page.on('request', (request) => {
      if (!request.url().startsWith(base)) outside.push(request.url());
    });
    const problems: string[] = [];
    page.on('pageerror', (e) => problems.push(e.message));

    // The form shows a bad field's message beside that field.
    await page.goto(`${base}/#/new`);
    await page.waitForSelector('#evaluation-form');
    await page.fill('#episodes', '1');
    await page.click('#submit');
    await expect.poll(() => page.textContent('#error-episodes')).toMatch(/--episodes: must be between 2/);

    // A good one: the warehouse demo with the careful route (the form's defaults), fixed seed.
    await page.selectOption('#env-choice', 'warehouse.json');
    await page.selectOption('#policy-choice', 'picker-careful.json');
    await page.fill('#episodes', '20000');
    await page.fill('#seed', '4');
    await page.click('#submit');
    await page.waitForURL(/#\/runs\/\w+$/);
    const id = page.url().split('/').pop()!;

    // The run page redraws when the run ends; then every plot has marks.
    await page.waitForSelector('#plot-convergence[data-rendered="true"]', { timeout: 30_000 });
    for (const kind of ['convergence', 'histogram', 'lengths', 'cdf', 'value-map']) {
      await page.waitForSelector(`#plot-${kind}[data-rendered="true"]`);
      const marks = Number(await page.getAttribute(`#plot-${kind}`, 'data-marks'));
      expect(marks, kind).toBeGreaterThan(0);
    }
    // The convergence line has one point per checkpoint (a path with many segments), the
    // histogram at least two bars, and the value map one square per open cell (warehouse: 7×10 minus 18 shelves).
    const lineSegments = await page.$eval('#plot-convergence g.mark-line path', (p) => (p.getAttribute('d') ?? '').split('L').length);
    expect(lineSegments).toBeGreaterThan(50);
    expect(await page.$$eval('#plot-histogram g.mark-rect path', (bars) => bars.length)).toBeGreaterThan(1);
    expect(await page.textContent('#projection')).toMatch(/episodes needed/);
    expect(await page.textContent('#risk')).toMatch(/mean of the worst 5%.*DKW/s);
    // Events: ending in the packing station and running the whole horizon, then one typed in.
    expect(await page.textContent('#risk')).toMatch(/P\(terminal=P\).*Clopper–Pearson.*Wilson/s);
    expect(await page.textContent('#risk')).toMatch(/P\(length>=\d+\)/);
    await page.fill('#risk-event', 'return<12');
    await page.click('#risk-box button[type="submit"]');
    await page.waitForFunction(() => document.querySelector('#risk')?.textContent?.includes('P(return<12)'));
    await page.fill('#risk-event', 'terminal=Q');
    await page.click('#risk-box button[type="submit"]');
    await page.waitForFunction(() => (document.querySelector('#error-event')?.textContent ?? '').includes('no terminal'));
    expect(await page.textContent('h1')).toMatch(/picker-careful\.json on warehouse\.json\s*done/);

    // The runs list shows it, filterable by environment.
    await page.goto(`${base}/#/`);
    await page.waitForSelector(`#runs-table tr[data-id="${id}"]`);
    await page.selectOption('#filter-env', 'warehouse.json');
    expect(await page.$$eval('#runs-table tbody tr', (rows) => rows.length)).toBe(1);

    // A comparison (posted over the API) gets its page: the differences around zero, the ranking.
    const posted = await fetch(`${base}/api/comparisons`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({
        env: readJson('warehouse.json'),
        env_name: 'warehouse.json',
        policies: [{ name: 'picker-direct.json', definition: readJson('picker-direct.json') }, { name: 'picker-careful.json', definition: readJson('picker-careful.json') }],
        episodes: 5000,
        seed: 1,
      }),
    });
    const comparison = ((await posted.json()) as { id: string }).id;
    await page.goto(`${base}/#/comparisons/${comparison}`);
    await page.waitForSelector('#plot-differences[data-rendered="true"]', { timeout: 30_000 }).catch(async (e) => {
      throw new Error(`${e.message}; the page says: ${await page.textContent('#main')}; errors: ${problems.join('; ')}`);
    });
    expect(await page.$$eval('#plot-differences g.mark-symbol path', (points) => points.length)).toBe(1);
    expect(await page.textContent('#comparison-policies tbody tr')).toMatch(/picker-careful\.json/);

    // Back to the run for the README's screenshot.
    await page.goto(`${base}/#/runs/${id}`);
    await page.waitForSelector('#plot-value-map[data-rendered="true"]');
    mkdirSync(path.dirname(SCREENSHOT), { recursive: true });
    await page.screenshot({ path: SCREENSHOT, fullPage: true, type: 'png' });
    expect(statSync(SCREENSHOT).size).toBeGreaterThan(10_000);

    expect(outside, 'requests to other hosts').toEqual([]);
    expect(problems, 'errors in the page').toEqual([]);
  });

  it('a target-error run keeps the form\'s Episodes as its cap and shows its target; the value map draws the moves; a comparison starts from the form and shows every figure; a run stops from its page', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 1500 } });
    const problems: string[] = [];
    page.on('pageerror', (e) => problems.push(e.message));
    const fail = async (e: Error) => {
      throw new Error(`${e.message}; the page says: ${await page.textContent('#main')}; errors: ${problems.join('; ')}`);
    };

    // A target no run of 3,000 episodes reaches: the run stops at the form's 3,000.
    await page.goto(`${base}/#/new`);
    await page.waitForSelector('#evaluation-form');
    await page.selectOption('#env-choice', 'warehouse.json');
    await page.selectOption('#policy-choice', 'picker-careful.json');
    await page.fill('#episodes', '3000');
    await page.fill('#seed', '5');
    await page.fill('#target_error', '0.0001');
    await page.click('#submit');
    await page.waitForURL(/#\/runs\/\w+$/);
    await page.waitForSelector('table.figures', { timeout: 30_000 }).catch(fail);
    const figures = (await page.textContent('table.figures')) ?? '';
    expect(figures).toMatch(/target half-width\s*±1\.00e-4: not reached \(±0\.\d+ after 3,000 episodes\)/);
    expect(figures).toMatch(/episodes\s*3,000 \(at most 3,000\)/);
    expect(figures).not.toContain('10,000,000');
    // The warehouse is a gridworld: the exact value sits beside the estimate.
    expect(figures).toMatch(/exact value\s*12\.06\d+ \(reckon exact\): (inside|OUTSIDE) the interval/);

    // The value map marks the start docks, and on request the policy's moves.
    await page.waitForSelector('#plot-value-map[data-rendered="true"]').catch(fail);
    expect(await page.$$eval('#plot-value-map g.mark-text text', (t) => t.filter((x) => x.textContent === 'S').length)).toBeGreaterThan(0);
    expect(await page.$$eval('#plot-value-map g.mark-text text', (t) => t.filter((x) => /^[↑↓←→]+$/.test(x.textContent ?? '')).length)).toBe(0);
    await page.check('#arrows-toggle');
    await page.waitForSelector('#plot-value-map[data-arrows="true"][data-rendered="true"]').catch(fail);
    expect(await page.$$eval('#plot-value-map g.mark-text text', (t) => t.filter((x) => /^[↑↓←→*]+$/.test(x.textContent ?? '')).length)).toBeGreaterThan(10);

    // A comparison from the form: its page shows what 'reckon compare' prints.
    await page.goto(`${base}/#/new`);
    await page.waitForSelector('#evaluation-form');
    await page.selectOption('#mode', 'compare');
    await page.selectOption('#env-choice', 'warehouse.json');
    await page.selectOption('#policy-choice', 'picker-careful.json');
    await page.selectOption('#policy2-choice', 'picker-direct.json');
    await page.fill('#episodes', '4000');
    await page.fill('#seed', '3');
    await page.check('#iqm');
    await page.click('#submit');
    await page.waitForURL(/#\/comparisons\/\w+$/);
    await page.waitForSelector('#plot-differences[data-rendered="true"]', { timeout: 30_000 }).catch(fail);
    const differences = (await page.textContent('#comparison-differences')) ?? '';
    for (const figure of ['p-value', 'correlation', 'variance reduction by pairing', 'P(first returns more)']) expect(differences).toContain(figure);
    expect(differences).toMatch(/picker-careful\.json − \[1\] picker-direct\.json/);
    const policies = (await page.textContent('#comparison-policies')) ?? '';
    expect(policies).toMatch(/IQM/);
    expect(policies).toMatch(/exact value/);
    expect(await page.$$eval('#comparison-policies tbody tr', (rows) => rows.length)).toBe(2);

    // A long run stopped from its page ends interrupted.
    await page.goto(`${base}/#/new`);
    await page.waitForSelector('#evaluation-form');
    await page.selectOption('#env-choice', 'warehouse.json');
    await page.fill('#episodes', '9000000');
    await page.click('#submit');
    await page.waitForURL(/#\/runs\/\w+$/);
    await page.waitForSelector('#stop-run', { timeout: 30_000 }).catch(fail);
    await page.click('#stop-run');
    await expect.poll(() => page.textContent('h1'), { timeout: 30_000 }).toMatch(/interrupted/);

    expect(problems, 'errors in the page').toEqual([]);
  }, 120_000);

  it('shows a comparison of groups: a dot per member, the group intervals, the variance split bar and the advice', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 1500 } });
    const problems: string[] = [];
    page.on('pageerror', (e) => problems.push(e.message));
    const group = (base: string, epsilons: number[]) => ({ kind: 'group', policies: epsilons.map((epsilon) => ({ kind: 'epsilon', epsilon, base: readJson(base) })) });
    const posted = await fetch(`${base}/api/comparisons`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({
        env: readJson('warehouse.json'),
        env_name: 'warehouse.json',
        groups: [
          { name: 'shortcut', definition: group('picker-direct.json', [0.03, 0.06, 0.12]) },
          { name: 'detour', definition: group('picker-careful.json', [0.05, 0.09, 0.15]) },
        ],
        episodes: 1000,
        seed: 2,
      }),
    });
    expect(posted.status).toBe(202);
    const comparison = ((await posted.json()) as { id: string }).id;
    await page.goto(`${base}/#/comparisons/${comparison}`);
    await page.waitForSelector('#plot-groups[data-rendered="true"]', { timeout: 30_000 }).catch(async (e) => {
      throw new Error(`${e.message}; the page says: ${await page.textContent('#main')}; errors: ${problems.join('; ')}`);
    });
    // Six members and two group means: eight dots and eight interval rules.
    expect(await page.$$eval('#plot-groups g.mark-symbol.role-mark path', (points) => points.length)).toBe(8);
    expect(await page.$$eval('#plot-groups g.mark-rule.role-mark line', (rules) => rules.length)).toBe(8);
    expect(await page.$$eval('section.group .split', (bars) => bars.length)).toBe(2);
    const share = await page.$eval('section.group[data-group="shortcut"] .split-seeds', (span) => (span as HTMLElement).style.width);
    expect(Number.parseFloat(share)).toBeGreaterThan(0);
    expect(await page.textContent('section.group[data-group="detour"] p.advice')).toMatch(/seeds|episodes/);
    expect(await page.textContent('#main')).toMatch(/shortcut − detour/);
    // The differences plot draws the one difference of group means, placed with the groups' figures.
    await page.waitForSelector('#plot-differences[data-rendered="true"]', { timeout: 30_000 });
    expect(await page.$$eval('#plot-differences g.mark-symbol path', (points) => points.length)).toBe(1);
    expect(await page.$eval('#plot-differences', (figure) => figure.previousElementSibling?.tagName)).toBe('TABLE');
    expect(problems, 'errors in the page').toEqual([]);
  });
});
