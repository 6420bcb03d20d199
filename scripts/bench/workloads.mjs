// The benchmark's workloads, written once per invocation into a scratch directory: definition
// files the engine reads exactly as a user's, and for finite ones the compiled tables that
// the C loop reads (export-mdp.mjs). Everything is seeded, so every run times the same work.
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildEnvironment, buildPolicy, parseEnvironment, parsePolicy, readDefinitionFile } from '../../dist/definitions/index.js';
import { writeFiniteMdp } from './export-mdp.mjs';
import { randomMdpRows, tabularDefinition } from './random-mdp.mjs';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const ENVS = path.join(ROOT, 'envs');
const HERE = path.dirname(fileURLToPath(import.meta.url));

/** Seed of every timed run (any fixed value; the same for engine, C and naive loops). */
export const RUN_SEED = 12345;

/**
 * Workloads as data. `episodes` is the count every runner of the workload uses (engine, C,
 * naive JS); `reference` names the compiled workload a module one is priced against.
 */
export const WORKLOADS = [
  {
    id: 'a',
    title: 'demo gridworld (warehouse, ε-direct policy)',
    episodes: 600_000,
    files: () => ({ env: path.join(ENVS, 'warehouse.json'), policy: path.join(ENVS, 'picker-direct-eps.json') }),
  },
  {
    id: 'b',
    title: 'random MDP: 400 states, 4 actions, 3 successors, H 400',
    episodes: 120_000,
    files: (dir) => randomTabular(dir, 'b', 400),
  },
  {
    id: 'c',
    title: 'short episodes: the MDP of (b) with H 10',
    episodes: 600_000,
    files: (dir) => randomTabular(dir, 'c', 10),
  },
  {
    id: 'd1',
    title: 'module: demo shelf restocking (base stock 8)',
    episodes: 30_000,
    reference: 'd3',
    files: () => ({ env: path.join(ENVS, 'restock-env.json'), policy: path.join(ENVS, 'restock-base-stock.json') }),
  },
  {
    id: 'd3',
    title: 'module: the shelf of (d1) with its Poisson sampler wired by hand (the earlier form)',
    episodes: 30_000,
    files: (dir) => handWiredRestock(dir),
  },
  {
    id: 'd2',
    title: 'module: the gridworld of (a) as code',
    episodes: 600_000,
    reference: 'a',
    files: (dir) => gridAsModule(dir),
  },
];

function handWiredRestock(dir) {
  const env = JSON.parse(readFileSync(path.join(ENVS, 'restock-env.json'), 'utf8'));
  const file = path.join(dir, 'restock-hand-wired-env.json');
  writeFileSync(file, JSON.stringify({ ...env, path: path.join(HERE, 'restock-hand-wired.js') }));
  return { env: file, policy: path.join(ENVS, 'restock-base-stock.json') };
}

function randomTabular(dir, id, horizon) {
  const file = path.join(dir, `random-400-h${horizon}.json`);
  const rows = randomMdpRows({ states: 400, actions: 4, successors: 3, terminals: 2, terminalChance: 0.008, seed: 2024 });
  writeFileSync(file, JSON.stringify(tabularDefinition(rows, { discount: 0.99, horizon })));
  const policy = path.join(dir, 'uniform.json');
  writeFileSync(policy, JSON.stringify({ kind: 'uniform' }));
  return { env: file, policy };
}

async function gridAsModule(dir) {
  const grid = JSON.parse(readFileSync(path.join(ENVS, 'warehouse.json'), 'utf8'));
  const eps = JSON.parse(readFileSync(path.join(ENVS, 'picker-direct-eps.json'), 'utf8'));
  const arrows = JSON.parse(readFileSync(path.join(ENVS, eps.base.path), 'utf8'));
  // The compiled gridworld's derived horizon, so both forms cut episodes at the same step.
  const compiled = await compile({ env: path.join(ENVS, 'warehouse.json'), policy: path.join(ENVS, 'picker-direct-eps.json') });
  const options = { layout: grid.layout, cells: grid.cells, step_reward: grid.step_reward, bump_reward: grid.bump_reward, discount: grid.discount, horizon: compiled.env.mdp.horizon };
  const env = path.join(dir, 'grid-module-env.json');
  const policy = path.join(dir, 'grid-module-policy.json');
  writeFileSync(env, JSON.stringify({ kind: 'module', path: path.join(HERE, 'grid-module.js'), options }));
  writeFileSync(policy, JSON.stringify({ kind: 'module', path: path.join(HERE, 'grid-module-policy.js'), options: { rows: arrows.rows, epsilon: eps.epsilon } }));
  return { env, policy };
}

/** Builds a workload's environment and policy through reckon's own definitions layer. */
export async function compile(files) {
  const envFile = readDefinitionFile(files.env);
  const policyFile = readDefinitionFile(files.policy);
  const env = await buildEnvironment(parseEnvironment(envFile.json, envFile.source), envFile.source);
  const policy = await buildPolicy(parsePolicy(policyFile.json, policyFile.source), env, policyFile.source);
  return { env, policy };
}

/**
 * Writes every workload's files into `dir`; returns, per workload, the definition paths and
 * (for finite ones with a tabulated policy) the exported tables for the C loop.
 */
export async function prepareWorkloads(dir) {
  mkdirSync(dir, { recursive: true });
  const prepared = [];
  for (const w of WORKLOADS) {
    const files = await w.files(dir);
    const { env, policy } = await compile(files);
    let table = null;
    if (env.kind === 'finite' && policy.kind === 'matrix') {
      table = path.join(dir, `${w.id}.mdp`);
      writeFiniteMdp(table, env.mdp, policy.matrix);
    }
    prepared.push({ id: w.id, title: w.title, episodes: w.episodes, reference: w.reference ?? null, ...files, table });
  }
  return prepared;
}
