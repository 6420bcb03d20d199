import { readFileSync } from 'node:fs';

/** One thread's scheduler figures so far. */
export interface ThreadTimes {
  /** Seconds this thread has run on a core. */
  readonly cpuSeconds: number;
  /** Seconds it was ready to run but waited for a core (other threads or processes held them). */
  readonly queuedSeconds: number;
}

const SCHEDSTAT = '/proc/thread-self/schedstat';
let readable = true;

/**
 * The calling thread's CPU time and run-queue wait. Node 20 has no per-thread CPU clock
 * (process.cpuUsage sums every thread), so this reads Linux's per-thread scheduler
 * statistics (nanoseconds on a core, nanoseconds waiting for one); null on other systems.
 * Used for the pool's timings, which tell a starved pool from a busy machine.
 */
export function threadTimes(): ThreadTimes | null {
  if (!readable) return null;
  try {
    const [running, waiting] = readFileSync(SCHEDSTAT, 'utf8').split(' ');
    const cpuSeconds = Number(running) / 1e9;
    const queuedSeconds = Number(waiting) / 1e9;
    if (!Number.isFinite(cpuSeconds) || !Number.isFinite(queuedSeconds)) throw new Error('unreadable');
    return { cpuSeconds, queuedSeconds };
  } catch {
    readable = false;
    return null;
  }
}
