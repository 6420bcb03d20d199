import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { reckon, tempFiles } from './run-cli.js';

/**
 * `reckon new`: the starters it writes pass `reckon check`, run with `reckon estimate`
 * unchanged, draw from a named distribution, and (with --ts) type-check against the plug-in
 * interface with the TypeScript compiler. The JavaScript and TypeScript starters are the same
 * model, so they give the same figures for one seed.
 */
const TSC = path.resolve(__dirname, '../../node_modules/typescript/bin/tsc');
const TYPES = path.resolve(__dirname, '../../node_modules/@types');

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

describe('reckon new', () => {
  const dir = tempFiles({});
  const run = (args: string[]) => reckon(args, { cwd: dir, env: { RECKON_CACHE_DIR: path.join(dir, 'cache') } });

  it('new env writes a module, its definition and a policy that check and estimate accept as written', () => {
    const wrote = json(run(['new', 'env', 'lift-queue', '--json']));
    expect(wrote.files).toStrictEqual(['lift-queue.js', 'lift-queue.json', 'lift-queue-uniform.json']);
    expect(readFileSync(path.join(dir, 'lift-queue.js'), 'utf8')).toMatch(/rng\.poisson\(/);
    const checked = json(run(['check', '--env', 'lift-queue.json', '--json']));
    expect(checked.actions).toStrictEqual(['one-line', 'two-lines']);
    const est = json(run(['estimate', '--env', 'lift-queue.json', '--policy', 'lift-queue-uniform.json', '--episodes', '500', '--seed', '1', '--no-store', '--json']));
    expect(est.episodes).toBe(500);
    expect(est.mean_length).toBe(48);
  });

  it('--ts starters type-check against the plug-in interface, run with no build step, and match the JavaScript starter', () => {
    json(run(['new', 'env', 'lift-ts', '--ts', '--json']));
    json(run(['new', 'policy', 'busy', '--ts', '--json']));
    json(run(['new', 'policy', 'busy-js', '--json']));
    const tsc = spawnSync(process.execPath, [TSC, '--noEmit', '--strict', '--module', 'nodenext', '--moduleResolution', 'nodenext', '--target', 'es2022', '--types', 'node', '--typeRoots', TYPES, 'lift-ts.ts', 'busy.ts'], { cwd: dir, encoding: 'utf8' });
    expect(tsc.stdout + tsc.stderr).toBe('');
    expect(tsc.status).toBe(0);
    expect(run(['check', '--env', 'lift-ts.json', '--policy', 'busy.json']).code).toBe(0);
    const args = ['--episodes', '400', '--seed', '2', '--no-store', '--json'];
    const ts = json(run(['estimate', '--env', 'lift-ts.json', '--policy', 'busy.json', ...args]));
    const js = json(run(['estimate', '--env', 'lift-queue.json', '--policy', 'busy-js.json', ...args]));
    expect(ts.mean).toBe(js.mean);
    expect(ts.std).toBe(js.std);
  });

  it('keeps existing files unless --force, and refuses unknown kinds and bad names (exit 2)', () => {
    const again = run(['new', 'env', 'lift-queue']);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain('lift-queue.js: already exists; choose another NAME, or give --force to overwrite');
    expect(run(['new', 'env', 'lift-queue', '--force']).code).toBe(0);
    const kind = run(['new', 'gizmo', 'x']);
    expect(kind.code).toBe(2);
    expect(kind.stderr).toContain('unknown kind "gizmo"');
    const name = run(['new', 'policy', '../escape']);
    expect(name.code).toBe(2);
    expect(name.stderr).toContain('"../escape" is not a usable name');
  });
});
