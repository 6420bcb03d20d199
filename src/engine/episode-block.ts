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

/** The memory of one block's three arrays, handed back to be filled again (see {@link BlockMemory}). */
export interface SpareBlock {
  readonly returns: ArrayBuffer;
  readonly lengths: ArrayBuffer;
  readonly finals: ArrayBuffer;
}

/** Block memory kept for reuse, per thread; more than this many spare sets are left to the GC. */
const MAX_SPARES = 4;

/**
 * Blocks whose arrays are reused. A block's arrays are transferred to the thread that reads
 * them, where, once read, they would only wait for a garbage collection: V8 collects
 * transferred memory late (it counts as external memory), so a long run's peak memory grew
 * by the 16 bytes an episode it had ever moved. Given back (`giveBack`), the same memory is
 * filled again. Capacities are rounded up to a power of two, so blocks of nearby sizes share.
 */
export class BlockMemory {
  private readonly spares: SpareBlock[] = [];

  /** A block for episodes [first, first + count), on spare memory when some is large enough. */
  take(first: number, count: number): EpisodeBlock {
    // The smallest spare that fits, so a short block leaves the large ones to long blocks.
    const bytes = count * 8;
    let k = -1;
    for (let i = 0; i < this.spares.length; i++) {
      const size = this.spares[i].returns.byteLength;
      if (size >= bytes && (k < 0 || size < this.spares[k].returns.byteLength)) k = i;
    }
    const spare = k >= 0 ? this.spares.splice(k, 1)[0] : null;
    const capacity = spare ? spare.returns.byteLength / 8 : roundUp(count);
    return {
      first,
      count,
      returns: new Float64Array(spare?.returns ?? new ArrayBuffer(capacity * 8), 0, count),
      lengths: new Uint32Array(spare?.lengths ?? new ArrayBuffer(capacity * 4), 0, count),
      finals: new Int32Array(spare?.finals ?? new ArrayBuffer(capacity * 4), 0, count),
    };
  }

  /** Keeps a block's memory for a later block (the block must not be read after this). */
  giveBack(spare: SpareBlock): void {
    this.spares.push(spare);
    if (this.spares.length > MAX_SPARES) {
      // Drop the smallest: blocks grow during a run, and the large sets are the ones to keep.
      let k = 0;
      for (let i = 1; i < this.spares.length; i++) if (this.spares[i].returns.byteLength < this.spares[k].returns.byteLength) k = i;
      this.spares.splice(k, 1);
    }
  }

  /** The largest spare set, to send to another thread, or null when none is kept. */
  spare(): SpareBlock | null {
    let k = -1;
    for (let i = 0; i < this.spares.length; i++) if (k < 0 || this.spares[i].returns.byteLength > this.spares[k].returns.byteLength) k = i;
    return k >= 0 ? this.spares.splice(k, 1)[0] : null;
  }
}

/** The memory behind a block's arrays (which may be longer than the block). */
export function blockMemory(block: EpisodeBlock): SpareBlock {
  return { returns: block.returns.buffer as ArrayBuffer, lengths: block.lengths.buffer as ArrayBuffer, finals: block.finals.buffer as ArrayBuffer };
}

function roundUp(count: number): number {
  let capacity = MIN_CAPACITY;
  while (capacity < count) capacity *= 2;
  return capacity;
}

const MIN_CAPACITY = 16;
