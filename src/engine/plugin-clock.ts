/**
 * Where a thread's plug-in calls have got to, so that a call that never returns can be named.
 * The rollout loops write the episode and a position code before every call into plug-in
 * code (plain stores, no locking: a store per call costs next to nothing against the call).
 * A worker thread writes into memory shared with the pool, which watches it from the main
 * thread (step-watch.ts); elsewhere the writes land in a private array no one reads.
 *
 * Position codes: -1 the environment's reset, 2t the policy at step t, 2t + 1 the
 * environment's step t.
 */
export const CLOCK_SLOTS = 3;
/** Slot of the clock where a worker that runs a process environment writes its program's pid (0: none). */
export const CLOCK_PID = 2;

/**
 * Bytes of a clock's buffer, far more than its slots need. Each worker writes its clock twice
 * a step; two 16-byte buffers allocated one after the other would share a cache line, and two
 * cores writing one line take turns owning it (false sharing), which slows every step. With
 * buffers of 128 bytes, two threads' slots are at least 128 bytes apart: never on one line.
 */
const CLOCK_BUFFER_BYTES = 128;

let clock: Float64Array<ArrayBufferLike> = new Float64Array(CLOCK_SLOTS);

/** This thread's clock: [episode, position]. */
export function pluginClock(): Float64Array<ArrayBufferLike> {
  return clock;
}

/** Makes this thread write its clock into memory the pool can read. */
export function shareClock(buffer: SharedArrayBuffer): void {
  clock = new Float64Array(buffer, 0, CLOCK_SLOTS);
}

export function newClockBuffer(): SharedArrayBuffer {
  const buffer = new SharedArrayBuffer(CLOCK_BUFFER_BYTES);
  new Float64Array(buffer, 0, CLOCK_SLOTS).fill(-2);
  return buffer;
}

/** The plug-in call a clock reading points at, as a PluginError names it. */
export function clockPosition(episode: number, position: number): { plugin: string; episode: number; step: number } {
  if (position < 0) return { plugin: 'the environment (reset)', episode, step: 0 };
  const step = Math.floor(position / 2);
  return { plugin: position % 2 === 0 ? 'the policy' : 'the environment (step)', episode, step };
}

/** Ends the program a worker's clock names (a process environment's), if any: one that hung would outlive its thread. */
export function killClockProgram(buffer: SharedArrayBuffer): void {
  const pid = new Float64Array(buffer)[CLOCK_PID];
  if (pid > 0) {
    try {
      process.kill(pid, 'SIGKILL');
    } catch {
      // already gone
    }
  }
}
