/**
 * A contiguous block of episodes [first, first + count) and where their results go.
 * Returns are float64 (8 bytes an episode), lengths uint32 and final states int32 (4 bytes
 * each): the only per-episode results a rollout hands back.
 */
export interface EpisodeBlock {
  readonly first: number;
  readonly count: number;
  readonly returns: Float64Array;
  readonly lengths: Uint32Array;
  /**
   * The state index each episode was in when it ended (a terminal, or wherever the horizon
   * stopped it), for finite environments; {@link NO_FINAL_STATE} for a module environment,
   * whose states are its own values.
   */
  readonly finals: Int32Array;
}

/** The final state of an episode whose states have no index (module environments). */
export const NO_FINAL_STATE = -1;

export function newBlock(first: number, count: number): EpisodeBlock {
  return { first, count, returns: new Float64Array(count), lengths: new Uint32Array(count), finals: new Int32Array(count) };
}

/** The first `count` episodes of a block (a run that stopped inside it keeps only those). */
export function blockPrefix(block: EpisodeBlock, count: number): EpisodeBlock {
  if (count === block.count) return block;
  return { first: block.first, count, returns: block.returns.subarray(0, count), lengths: block.lengths.subarray(0, count), finals: block.finals.subarray(0, count) };
}
