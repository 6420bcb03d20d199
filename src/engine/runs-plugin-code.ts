import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { isCodeKind } from '../definitions/process-schema.js';
import type { RolloutSpec } from './spec.js';

/** Deeper chains of `base.path` than this are left to the policy builder, which names the loop. */
const MAX_BASE_DEPTH = 16;

/**
 * Whether building this spec calls user code: a module or process environment, or a module policy
 * anywhere in the chain of epsilon bases (inline or by `base.path`). Such a spec is only ever
 * built on worker threads, since a module's top level or factory that never returns would
 * otherwise hold the thread that answers Ctrl-C. Decided from the JSON alone, before any
 * module is loaded; a file that cannot be read counts as code, so the worker that builds the
 * spec reports it.
 */
export function runsPluginCode(spec: Pick<RolloutSpec, 'env' | 'policy'>): boolean {
  // A process environment starts a program (its make_env may never answer) and runs its episodes there.
  if (isCodeKind(spec.env.json)) return true;
  return policyRunsCode(spec.policy.json, spec.policy.source.baseDir, 0);
}

/**
 * Whether a spec that runs a program can still run its episodes on the calling thread: a
 * process environment with a policy that runs none of the user's JavaScript (one of reckon's
 * own, or a policy of the program). Every call into the program is answered asynchronously and
 * times out on its connection, so it never holds this thread, and no thread has to start (or
 * load reckon again) for it.
 */
export function runsOnCallingThread(spec: Pick<RolloutSpec, 'env' | 'policy'>): boolean {
  return kindOf(spec.env.json) === 'process' && !policyRunsCode(spec.policy.json, spec.policy.source.baseDir, 0);
}

function kindOf(json: unknown): unknown {
  return json !== null && typeof json === 'object' ? (json as { kind?: unknown }).kind : undefined;
}

function policyRunsCode(json: unknown, baseDir: string, depth: number): boolean {
  const kind = kindOf(json);
  if (kind === 'module') return true;
  if (kind !== 'epsilon') return false;
  const base = (json as { base?: unknown }).base;
  if (base === null || typeof base !== 'object') return false;
  if ('kind' in base) return policyRunsCode(base, baseDir, depth);
  const path = (base as { path?: unknown }).path;
  if (typeof path !== 'string') return false;
  if (depth >= MAX_BASE_DEPTH) return true;
  const file = resolve(baseDir, path);
  try {
    return policyRunsCode(JSON.parse(readFileSync(file, 'utf8')), dirname(file), depth + 1);
  } catch {
    return true;
  }
}
