/**
 * `estimate --record FILE`: the run's episodes as a logged-episode file. Checked before the
 * run starts (a finite environment, a policy with probabilities), written after it, by
 * replaying the same seeded episodes.
 */
import { loadEnvironmentFile, loadPolicyFile } from '../definitions/load.js';
import { InputError } from '../errors.js';
import { recordFiniteEpisodes } from '../engine/record-finite.js';

export interface EpisodeRecorder {
  /** Writes episodes first .. first + count − 1 of the seeded run. */
  write(seed: number, first: number, count: number): void;
}

export async function prepareRecorder(path: string, envPath: string, policyPath: string, start: string | null): Promise<EpisodeRecorder> {
  const env = await loadEnvironmentFile(envPath);
  if (env.built.kind !== 'finite') {
    throw new InputError('--record', `needs a gridworld or tabular environment (${envPath} is a code environment, whose states reckon cannot name or replay outside the run)`);
  }
  const mdp = env.built.mdp;
  const policy = await loadPolicyFile(policyPath, env.built);
  if (!policy.built.matrix) {
    throw new InputError('--record', `needs the behaviour policy's probabilities: ${policyPath} is a code policy without probabilities(state)`);
  }
  const startIndex = start === null ? -1 : (mdp.stateIndex.get(start) ?? -1);
  return {
    write(seed, first, count) {
      recordFiniteEpisodes(path, {
        mdp,
        policy: policy.built,
        seed,
        start: startIndex,
        first,
        count,
        description: `reckon estimate --env ${envPath} --policy ${policyPath} --seed ${seed}${start === null ? '' : ` --start ${start}`}, episodes ${first} to ${first + count - 1}`,
      });
    },
  };
}
