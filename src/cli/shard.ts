import { InputError } from '../errors.js';
import type { ShardInfo } from '../store/runs.js';

/**
 * `--shard K/M`: the K-th (1-based) of M disjoint, contiguous episode ranges of one seeded
 * run. `--shard auto/M` takes K from a job-array variable: Kubernetes Indexed Jobs'
 * JOB_COMPLETION_INDEX (0-based) or Slurm's SLURM_ARRAY_TASK_ID (relative to
 * SLURM_ARRAY_TASK_MIN when set, else taken as 0-based).
 */
export function parseShard(text: string, env: NodeJS.ProcessEnv = process.env): { index: number; count: number } {
  const match = /^\s*(auto|\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  if (!match) throw new InputError('--shard', `must be K/M or auto/M, e.g. --shard 2/8 (got "${text}")`);
  const count = Number(match[2]);
  if (!(count >= 1 && count <= 100000)) throw new InputError('--shard', `M must be between 1 and 100000 (got ${count})`);
  let index: number;
  if (match[1] === 'auto') {
    if (env.JOB_COMPLETION_INDEX !== undefined && env.JOB_COMPLETION_INDEX !== '') {
      index = Number(env.JOB_COMPLETION_INDEX) + 1;
    } else if (env.SLURM_ARRAY_TASK_ID !== undefined && env.SLURM_ARRAY_TASK_ID !== '') {
      const min = env.SLURM_ARRAY_TASK_MIN ? Number(env.SLURM_ARRAY_TASK_MIN) : 0;
      index = Number(env.SLURM_ARRAY_TASK_ID) - min + 1;
    } else {
      throw new InputError('--shard', 'auto needs JOB_COMPLETION_INDEX (Kubernetes Indexed Job) or SLURM_ARRAY_TASK_ID (Slurm job array) in the environment; give K/M instead');
    }
    if (!Number.isInteger(index)) throw new InputError('--shard', 'the job-array index in the environment is not a whole number');
  } else {
    index = Number(match[1]);
  }
  if (!(index >= 1 && index <= count)) throw new InputError('--shard', `K must be between 1 and ${count} (got ${index})`);
  return { index, count };
}

/** The episode range [first, first + count) of shard K of M over `total` episodes. */
export function shardRange(shard: { index: number; count: number }, total: number): { first: number; count: number } {
  const first = Math.floor(((shard.index - 1) * total) / shard.count);
  const end = Math.floor((shard.index * total) / shard.count);
  return { first, count: end - first };
}

export function shardInfo(shard: { index: number; count: number }, total: number): ShardInfo {
  return { index: shard.index, count: shard.count, total };
}
