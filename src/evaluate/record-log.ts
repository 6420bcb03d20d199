/**
 * `estimate --record FILE`: the run's episodes as a logged-episode file. Checked before the
 * run starts (a policy with probabilities), written after it, by replaying the same seeded
 * episodes: on this thread for definitions without code, on a worker thread of their own
 * for a module environment or policy.
 */
import { loadEnvironmentFile, loadPolicyFile } from '../definitions/load.js';
import { recordFiniteEpisodes } from '../engine/record-finite.js';
import { ModuleRecorder } from '../engine/module-recorder.js';
import type { RolloutSpec } from '../engine/spec.js';
import { runsPluginCode } from '../engine/runs-plugin-code.js';

export interface EpisodeRecorder {
  /** Writes episodes first .. first + count − 1 of the seeded run. */
  write(first: number, count: number): Promise<void>;
  /** Frees what the recorder holds (a code environment's worker thread). */
  close(): Promise<void>;
}

export async function prepareRecorder(
  path: string,
  spec: RolloutSpec,
  files: { env: string; policy: string },
  stepTimeout?: number,
): Promise<EpisodeRecorder> {
  const { start, seed } = spec;
  const description = `reckon estimate --env ${files.env} --policy ${files.policy} --seed ${seed}${start === null ? '' : ` --start ${start}`}`;
  if (runsPluginCode(spec)) {
    // User code is loaded on the recorder's own thread, never on this one.
    const recorder = await ModuleRecorder.start(spec, path, stepTimeout);
    return {
      write: (first, count) => recorder.write(first, count, `${description}, episodes ${first} to ${first + count - 1}`),
      close: () => recorder.close(),
    };
  }
  const env = await loadEnvironmentFile(files.env);
  if (env.built.kind !== 'finite') throw new Error('a finite environment was expected');
  const mdp = env.built.mdp;
  const policy = await loadPolicyFile(files.policy, env.built);
  if (!policy.built.matrix) throw new Error('a built-in policy on a finite environment has a matrix');
  const startIndex = start === null ? -1 : (mdp.stateIndex.get(start) ?? -1);
  return {
    async write(first, count) {
      recordFiniteEpisodes(path, {
        mdp,
        policy: policy.built,
        seed,
        start: startIndex,
        first,
        count,
        description: `${description}, episodes ${first} to ${first + count - 1}`,
      });
    },
    async close() {},
  };
}
