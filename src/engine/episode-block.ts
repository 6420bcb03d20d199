/**
 * A contiguous block of episodes [first, first + count) and where their results go.
 * Returns are float64 (8 bytes an episode) and lengths uint32 (4 bytes): the only per-episode
 * memory a run keeps.
 */
export interface EpisodeBlock {
  readonly first: number;
  readonly count: number;
  readonly returns: Float64Array;
  readonly lengths: Uint32Array;
}

export function newBlock(first: number, count: number): EpisodeBlock {
  return { first, count, returns: new Float64Array(count), lengths: new Uint32Array(count) };
}
