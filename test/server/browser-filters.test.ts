import { existsSync } from 'node:fs';
import path from 'node:path';
import type { FastifyInstance } from 'fastify';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildApp } from '../../src/server/app.js';
import { ENVS, FIXTURES, reckon, tempFiles } from '../cli/run-cli.js';

/**
 * The runs table's filters, sorting and shared address, and a run's labels, notes and
 * provenance (with the copy button), in headless Chromium. The reference is which runs were
 * stored with what (common practice: a filter shows exactly the runs that satisfy it).
 */
const CHROMIUM = '/usr/bin/chromium';
const FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run'];
const haveChromium = existsSync(CHROMIUM);
const C = path.join(FIXTURES, 'textbook-samples');

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe.skipIf(!haveChromium)('the runs table filters in headless Chromium', () => {
  let app: FastifyInstance;
  let base: string;
  let browser: import('playwright-core').Browser;
  const store = path.join(tempFiles({}), 'runs.sqlite');
  const grid = ['--env', path.join(C, 'grid-4x3-slip.json')];
  const ids: Record<string, string> = {};

  beforeAll(async () => {
    const s = ['--store', store, '--json'];
    ids.reported = json(reckon(['estimate', ...grid, '--policy', path.join(C, 'grid-4x3-policy.json'), '--episodes', '300', '--seed', '1', '--label', 'reported=yes', '--note', 'the figure in the dock review', ...s])).run_id;
    ids.draft = json(reckon(['estimate', ...grid, '--policy', path.join(ENVS, 'textbook', 'uniform.json'), '--episodes', '300', '--seed', '2', '--label', 'draft=yes', ...s])).run_id;
    ids.comparison = json(reckon(['compare', ...grid, '--policy', path.join(C, 'grid-4x3-policy.json'), '--policy', path.join(ENVS, 'textbook', 'uniform.json'), '--episodes', '300', '--seed', '3', ...s])).run_id;
    app = await buildApp({ storePath: store, toolVersion: 'test', workers: 1 });
    base = await app.listen({ host: '127.0.0.1', port: 0 });
    const { chromium } = await import('playwright-core');
    browser = await chromium.launch({ executablePath: CHROMIUM, args: FLAGS });
  }, 60_000);
  afterAll(async () => {
    await browser?.close();
    await app?.close();
  });

  it('filters by label, text and kind, sorts by a column, and keeps the view in the address', async () => {
    const context = await browser.newContext({ permissions: ['clipboard-read', 'clipboard-write'] });
    const page = await context.newPage();
    const problems: string[] = [];
    page.on('pageerror', (e) => problems.push(e.message));
    const shownIds = () => page.$$eval('#runs-table tbody tr[data-id]', (rows) => rows.map((r) => r.getAttribute('data-id')));

    await page.goto(`${base}/#/`);
    await page.waitForSelector(`#runs-table tr[data-id="${ids.reported}"]`);
    expect((await shownIds()).sort()).toEqual([ids.reported, ids.draft, ids.comparison].sort());

    await page.fill('#filter-label', 'reported=yes');
    await expect.poll(shownIds).toEqual([ids.reported]);
    await expect.poll(() => page.url()).toMatch(/#\/\?label=reported%3Dyes$/);
    await page.fill('#filter-label', '');
    await page.selectOption('#filter-kind', 'comparison');
    await expect.poll(shownIds).toEqual([ids.comparison]);
    await page.selectOption('#filter-kind', '');
    await page.fill('#filter-text', 'dock review');
    await expect.poll(shownIds).toEqual([ids.reported]);
    await page.fill('#filter-text', '');
    await expect.poll(async () => (await shownIds()).length).toBe(3);

    // Sorting by labels: ascending puts the unlabelled comparison first, then draft=…, reported=….
    await page.click('button.sort[data-key="labels"]');
    await expect.poll(shownIds).toEqual([ids.comparison, ids.draft, ids.reported]);
    expect(page.url()).toMatch(/sort=labels&order=asc/);

    // A shared address opens the same view.
    await page.fill('#filter-label', 'draft');
    await expect.poll(shownIds).toEqual([ids.draft]);
    const shared = page.url();
    const other = await context.newPage();
    await other.goto(shared);
    await other.waitForSelector(`#runs-table tr[data-id="${ids.draft}"]`);
    expect(await other.$$eval('#runs-table tbody tr[data-id]', (rows) => rows.length)).toBe(1);
    expect(await other.inputValue('#filter-label')).toBe('draft');
    expect(await other.getAttribute('#runs-table th[aria-sort]', 'aria-sort')).toBe('ascending');

    // A bad filter is said beside the filters, and the table stays.
    await page.fill('#filter-label', 'not a key');
    await expect.poll(() => page.textContent('#filter-error')).toMatch(/^\?label: a label key is/);

    // The run page: labels, notes, provenance and the copy button.
    await page.goto(`${base}/#/runs/${ids.reported}`);
    await page.waitForSelector('#provenance');
    expect(await page.textContent('#annotations')).toMatch(/reported=yes.*the figure in the dock review/s);
    const command = await page.textContent('#reproduce-command');
    expect(command).toMatch(/^reckon estimate --env \S+grid-4x3-slip\.json --policy \S+grid-4x3-policy\.json --seed 1 --episodes 300$/);
    expect(await page.textContent('#definition-files')).toMatch(/unchanged on disk/);
    await page.click('#copy-command');
    await expect.poll(() => page.textContent('.copy-status')).toMatch(/Copied|Selected/);
    if ((await page.textContent('.copy-status'))?.startsWith('Copied')) expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(command);

    // Labels and notes added from the page are stored, and a bad one is refused beside the field.
    await page.click('details.annotate summary');
    await page.fill('#add-label', 'bad key=1');
    await page.click('#add-label-button');
    await expect.poll(() => page.textContent('#annotation-error')).toMatch(/a label key is 1 to 64/);
    await page.fill('#add-label', 'release=v3');
    await page.click('#add-label-button');
    await expect.poll(() => page.textContent('#annotations')).toMatch(/release=v3/);
    await page.click('details.annotate summary');
    await page.fill('#add-note', 'checked again in the page');
    await page.click('#add-note-button');
    await expect.poll(() => page.textContent('#annotations')).toMatch(/checked again in the page/);
    const stored = json(reckon(['runs', 'show', ids.reported, '--store', store, '--json']));
    expect(stored.labels).toStrictEqual({ release: 'v3', reported: 'yes' });
    expect(stored.notes.map((n: { text: string }) => n.text)).toEqual(['the figure in the dock review', 'checked again in the page']);
    expect(problems, 'errors in the page').toEqual([]);
    await context.close();
  }, 90_000);
});
