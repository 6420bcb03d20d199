/** The importance ratios of a log under a target: the flat form the estimators read. */
import type { EpisodeLog } from '../definitions/episode-log.js';
import { cumulativeWeights, type WeightedEpisodes } from '../stats/off-policy/weighted-episodes.js';
import type { TargetOnLog } from './target-on-log.js';

/** π(a_t | s_t) of every logged step. */
export function targetProbabilities(log: EpisodeLog, target: TargetOnLog): Float64Array {
  const width = target.actionNames.length;
  const out = new Float64Array(log.state.length);
  for (let k = 0; k < out.length; k++) out[k] = target.probability[log.state[k] * width + log.action[k]];
  return out;
}

export function weightedEpisodes(log: EpisodeLog, target: TargetOnLog, discount: number): WeightedEpisodes {
  const weight = cumulativeWeights(log.episodeStart, targetProbabilities(log, target), log.behaviourProb);
  return { episodeStart: log.episodeStart, reward: log.reward, weight, discount };
}
