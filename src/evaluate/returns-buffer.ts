import { NO_FINAL_STATE } from '../engine/episode-block.js';

/** Horizons up to this keep a histogram of episode lengths (for length events of the risk report). */
const MAX_HISTOGRAM_HORIZON = 1_000_000;

/**
 * Every episode's return, in episode order, 8 bytes each: what re-analysis (bootstrap,
 * another interval method) needs. Lengths are not kept one by one, only summed and counted
 * in a histogram over 0 … horizon; final states only counted, per state index (enough for the
 * probability of ending in a terminal).
 */
export class ReturnsBuffer {
  private data: Float64Array;
  count = 0;
  lengthSum = 0;
  longest = 0;
  /** Episodes that ran the full horizon without ending (their returns may be truncated). */
  atHorizon = 0;

  /** lengthCounts[k]: episodes of exactly k steps; null for very long horizons. */
  readonly lengthCounts: Float64Array | null;

  private finalCounts = new Float64Array(16);
  /** False once an episode came without a final state (module environments, older stored runs). */
  private finalsKnown = true;
  /** Every episode's length and final state, kept only when asked (paired event differences need them). */
  private episodeLengths: Uint32Array | null = null;
  private episodeFinals: Int32Array | null = null;

  constructor(capacity: number, private readonly horizon: number, options: { keepEpisodes?: boolean } = {}) {
    this.data = new Float64Array(Math.max(16, capacity));
    this.lengthCounts = horizon <= MAX_HISTOGRAM_HORIZON ? new Float64Array(horizon + 1) : null;
    if (options.keepEpisodes) {
      this.episodeLengths = new Uint32Array(this.data.length);
      this.episodeFinals = new Int32Array(this.data.length);
    }
  }

  /** Appends episodes in order; `finals` (the state each ended in) may be missing, which makes {@link endedIn} unknown. */
  append(returns: Float64Array, lengths: Uint32Array, finals?: Int32Array | null): void {
    const needed = this.count + returns.length;
    if (needed > this.data.length) {
      const grown = new Float64Array(Math.max(needed, this.data.length * 2));
      grown.set(this.data.subarray(0, this.count));
      this.data = grown;
    }
    const start = this.count;
    this.data.set(returns, start);
    this.count = needed;
    if (this.episodeLengths && this.episodeFinals) {
      if (needed > this.episodeLengths.length) {
        const lengthsGrown = new Uint32Array(this.data.length);
        lengthsGrown.set(this.episodeLengths.subarray(0, start));
        this.episodeLengths = lengthsGrown;
        const finalsGrown = new Int32Array(this.data.length);
        finalsGrown.set(this.episodeFinals.subarray(0, start));
        this.episodeFinals = finalsGrown;
      }
      this.episodeLengths.set(lengths, start);
      if (finals && finals.length === returns.length) this.episodeFinals.set(finals, start);
      else this.episodeFinals.fill(NO_FINAL_STATE, start, needed);
    }
    for (let i = 0; i < lengths.length; i++) {
      const length = lengths[i];
      this.lengthSum += length;
      if (length > this.longest) this.longest = length;
      if (length >= this.horizon) this.atHorizon++;
      if (this.lengthCounts) this.lengthCounts[Math.min(length, this.horizon)]++;
    }
    if (!finals || finals.length !== returns.length) {
      if (returns.length > 0) this.finalsKnown = false;
      return;
    }
    let counts = this.finalCounts;
    for (let i = 0; i < finals.length; i++) {
      const s = finals[i];
      if (s === NO_FINAL_STATE) {
        this.finalsKnown = false;
        continue;
      }
      if (s >= counts.length) {
        const grown = new Float64Array(Math.max(s + 1, counts.length * 2));
        grown.set(counts);
        counts = this.finalCounts = grown;
      }
      counts[s]++;
    }
  }

  /** A view of the returns so far (no copy). */
  view(): Float64Array {
    return this.data.subarray(0, this.count);
  }

  /** Every episode's length and final state in order, when kept (`keepEpisodes`); finals null when not all were recorded. */
  episodes(): { lengths: Uint32Array; finals: Int32Array | null } | null {
    if (!this.episodeLengths || !this.episodeFinals) return null;
    return { lengths: this.episodeLengths.subarray(0, this.count), finals: this.finalsKnown ? this.episodeFinals.subarray(0, this.count) : null };
  }

  /** Episodes that ended in one of these states, or null when final states were not recorded. */
  endedIn(states: readonly number[]): number | null {
    if (!this.finalsKnown) return null;
    let n = 0;
    for (const s of states) if (s < this.finalCounts.length) n += this.finalCounts[s];
    return n;
  }
}
