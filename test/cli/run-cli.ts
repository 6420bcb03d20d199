import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

/** The built command line (npm test compiles before running the tests). */
export const CLI = path.resolve(__dirname, '../../dist/cli/main.js');
export const ENVS = path.resolve(__dirname, '../../envs');
export const FIXTURES = path.resolve(__dirname, '../fixtures');

export interface CliResult {
  code: number | null;
  stdout: string;
  stderr: string;
}

/** Every test process gets its own default store, so tests never touch the user's. */
const DEFAULT_STORE = path.join(mkdtempSync(path.join(tmpdir(), 'reckon-store-')), 'runs.sqlite');

export function reckon(args: string[], options: { cwd?: string; env?: NodeJS.ProcessEnv } = {}): CliResult {
  const result = spawnSync(process.execPath, [CLI, ...args], {
    cwd: options.cwd,
    env: { ...process.env, RECKON_NO_PROGRESS: '1', RECKON_STORE: DEFAULT_STORE, ...options.env },
    encoding: 'utf8',
    timeout: 120_000,
  });
  return { code: result.status, stdout: result.stdout, stderr: result.stderr };
}

/** Writes files into a fresh temporary folder and returns its path. */
export function tempFiles(files: Record<string, string | object>): string {
  const dir = mkdtempSync(path.join(tmpdir(), 'reckon-test-'));
  for (const [name, content] of Object.entries(files)) {
    writeFileSync(path.join(dir, name), typeof content === 'string' ? content : JSON.stringify(content, null, 2));
  }
  return dir;
}
