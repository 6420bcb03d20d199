import { Worker } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import path from 'node:path';
import { InputError } from '../errors.js';
import { BlockMemory, blockMemory, newBlock, type EpisodeBlock } from './episode-block.js';
import { prepareOnCallingThread, prepareRollout, type PreparedRollout } from './prepare.js';
import { rolloutTables } from './finite-rollout.js';
import type { TableWorkerData } from './table-worker.js';
import type { RolloutSpec } from './spec.js';
import type { FromWorker } from './worker-messages.js';
import { killClockProgram, newClockBuffer } from './plugin-clock.js';
import { DEFAULT_STEP_TIMEOUT_SECONDS, StepWatch, watchInterval } from './step-watch.js';
import type { CodeWorkerData } from './worker.js';
import { EarlyWorkers } from './early-workers.js';
import { runsOnCallingThread, runsPluginCode } from './runs-plugin-code.js';
import { ThreadTimingRecorder, type ThreadTiming } from './thread-timing.js';
import { threadTimes } from './thread-times.js';

export interface RunOptions {
  /** First episode index (a resumed or sharded run starts later). */
  readonly first: number;
  readonly count: number;
  /** Threads that run episodes, this one included; 1 runs everything in this thread. */
  readonly workers: number;
  /** Called with every block, in episode order, exactly once each. */
  readonly onBlock: (block: EpisodeBlock, steps: number) => void;
  /**
   * Set when `onBlock` copies what it keeps and reads nothing of the block after it returns:
   * the block's memory is then filled again by a later block (on any thread), so a long run
   * allocates nothing per block. Transferred block memory is collected late, and would
   * otherwise add its 16 bytes an episode to the run's peak memory.
   */
  readonly reuseBlocks?: boolean;
  /** Stops issuing new blocks; blocks already running still finish and are delivered in order. */
  readonly signal?: AbortSignal;
  /** Wall-clock seconds a block should take (sets its size; never affects results). */
  readonly blockSeconds?: number;
  /** The spec already prepared by the caller (`prepareRollout(spec)`), so it is not parsed again. */
  readonly prepared?: PreparedRollout;
  /**
   * Whether this thread runs blocks too (default true): with K workers, this thread and K − 1
   * worker threads. A caller whose event loop must stay responsive (a server) passes false
   * and gets K worker threads.
   */
  readonly callerRuns?: boolean;
  /** Seconds one plug-in call may take before the run fails (default 10). */
  readonly stepTimeout?: number;
  /** Code worker threads already started for this spec (startCodeWorkers); the pool takes what it needs. */
  readonly early?: EarlyWorkers | null;
  /**
   * Code worker threads to take first (as `early`) and to give back when the run ends cleanly,
   * so the next run of the same spec starts without loading anything (keepCodeWorkers). The
   * caller closes it when done.
   */
  readonly keep?: EarlyWorkers | null;
}

export interface RunOutcome {
  readonly episodes: number;
  readonly steps: number;
  /** Seconds from the first episode to the last (excluding preparing the spec). */
  readonly seconds: number;
  /** Where each thread's time went (start-up, busy, idle, its own CPU): for benchmarks and diagnosis. */
  readonly threads: readonly ThreadTiming[];
}

export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

/**
 * Runs episodes [first, first + count) of a spec on `workers` threads. Blocks are handed out
 * on demand and delivered in episode order, so what the caller sees (and every figure it
 * computes) is the same whatever the number of workers or the block sizes.
 */
export async function runEpisodes(spec: RolloutSpec, options: RunOptions): Promise<RunOutcome> {
  const workers = threadsFor(options.workers, options.count);
  // Plug-in code runs on worker threads only, its loading and factory included: a call that
  // hangs must not stop this thread from answering signals and from noticing the hang
  // (step-watch.ts).
  const plugins = runsPluginCode(spec);
  // A process environment whose policy runs no user JavaScript runs here too: its program's
  // calls never hold this thread (runsOnCallingThread).
  const here = !plugins || runsOnCallingThread(spec);
  const prepared = here ? (options.prepared ?? (plugins ? await prepareOnCallingThread(spec, options.signal) : await prepareRollout(spec))) : null;
  const callerRuns = (options.callerRuns ?? true) && here;
  if (workers === 1 && prepared && callerRuns) return prepared.runBlockAsync ? runInlineAsync(prepared, options) : runInline(prepared, options);
  return runThreaded(spec, prepared, options, workers, callerRuns);
}

/**
 * For a spec that runs user code: its worker threads, started now, so they load while the
 * caller prepares the spec (early-workers.ts). The first also describes the environment
 * (EarlyWorkers.facts) once it has built it, so nothing builds the spec only to say what it
 * is: no second load of a module and its factory, no program of a process environment
 * started only for that. Null for any other spec, and where this thread drives the only program.
 */
export function startCodeWorkers(spec: RolloutSpec, workers: number, episodes?: number): EarlyWorkers | null {
  if (!runsPluginCode(spec)) return null;
  const threads = episodes === undefined ? workers : threadsFor(workers, episodes);
  // This thread runs one program itself (runsOnCallingThread): the threads run the others.
  if (runsOnCallingThread(spec)) return threads < 2 ? null : new EarlyWorkers(workerUrl('worker.js'), spec, threads - 1);
  return new EarlyWorkers(workerUrl('worker.js'), spec, Math.max(1, threads), { facts: true });
}

/** Threads a run of `count` episodes uses: no more than one per 64 episodes. */
function threadsFor(workers: number, count: number): number {
  return Math.max(1, Math.min(workers, Math.ceil(count / 64) || 1));
}

/**
 * For a code environment run in several calls (a comparison's batches): an empty set that
 * runEpisodes (`keep`) fills with its worker threads at the end of each clean run and takes
 * them from at the start of the next. Null for any other spec, whose workers start in
 * milliseconds.
 */
export function keepCodeWorkers(spec: RolloutSpec): EarlyWorkers | null {
  // A process environment's program belongs to its run (ended with the run's threads), so its threads are not kept.
  if (!runsPluginCode(spec) || isProcessSpec(spec)) return null;
  return new EarlyWorkers(workerUrl('worker.js'), spec, 0);
}

const MIN_BLOCK = 16;
const MAX_BLOCK = 65536;
/** How long a stopped run waits for the blocks still running before it leaves them. */
const ABORT_GRACE_MS = 2000;
/** Block length for this thread when it shares the work with worker threads. */
const CALLER_BLOCK_SECONDS = 0.02;

/** Chooses block sizes so a block takes about `target` seconds, within [16, 65536] episodes. */
class BlockSizer {
  size = 32;
  constructor(private readonly target: number) {}
  observe(count: number, seconds: number): void {
    if (seconds <= 0) {
      this.size = Math.min(MAX_BLOCK, this.size * 4);
      return;
    }
    const ideal = (count / seconds) * this.target;
    this.size = Math.max(MIN_BLOCK, Math.min(MAX_BLOCK, Math.round(Math.min(ideal, this.size * 4))));
  }
}

/**
 * A stopped run waits a moment for the block this thread is running on its program, then ends
 * the program, so a call that never returns cannot hold up Ctrl-C. Returns the clean-up.
 */
function stopProgramOnAbort(signal: AbortSignal | undefined, endProgram: () => void): () => void {
  let timer: NodeJS.Timeout | undefined;
  const onAbort = () => {
    timer ??= setTimeout(endProgram, ABORT_GRACE_MS);
  };
  if (signal?.aborted) onAbort();
  signal?.addEventListener('abort', onAbort);
  return () => {
    clearTimeout(timer);
    signal?.removeEventListener('abort', onAbort);
  };
}

/** Lets signals, timers, worker messages and progress output through between blocks. */
function yieldToEventLoop(): Promise<void> {
  return new Promise<void>((resolve) => setImmediate(resolve));
}

async function runInline(prepared: PreparedRollout, options: RunOptions): Promise<RunOutcome> {
  const started = performance.now();
  const timing = new ThreadTimingRecorder('caller', sharedClock());
  const times0 = threadTimes();
  let previousEnd = sharedClock();
  const sizer = new BlockSizer(options.blockSeconds ?? 0.1);
  const end = options.first + options.count;
  let next = options.first;
  let steps = 0;
  const memory = options.reuseBlocks ? new BlockMemory() : null;
  while (next < end && !options.signal?.aborted) {
    const count = Math.min(sizer.size, end - next);
    const block = memory ? memory.take(next, count) : newBlock(next, count);
    const t0 = performance.now();
    const blockSteps = prepared.runBlock(block);
    const t1 = performance.now();
    sizer.observe(count, (t1 - t0) / 1000);
    timing.ranBlock(count, blockSteps, performance.timeOrigin + t0, performance.timeOrigin + t1, previousEnd);
    steps += blockSteps;
    next += count;
    options.onBlock(block, blockSteps);
    memory?.giveBack(blockMemory(block));
    await yieldToEventLoop();
    previousEnd = sharedClock();
  }
  recordCallerTimes(timing, times0);
  return { episodes: next - options.first, steps, seconds: (performance.now() - started) / 1000, threads: [timing.result(sharedClock())] };
}

/**
 * One thread, blocks that wait on a process environment's program (runBlockAsync). Where the
 * rollout allows it (overlapBlocks: the episode path) the next block is asked for before the
 * current one is read, so the program goes from one to the next without waiting on this
 * thread. A stopped run delivers what it has; after a grace it ends a program stuck in a call.
 */
async function runInlineAsync(prepared: PreparedRollout, options: RunOptions): Promise<RunOutcome> {
  const started = performance.now();
  const timing = new ThreadTimingRecorder('caller', sharedClock());
  const times0 = threadTimes();
  const stepTimeout = options.stepTimeout ?? DEFAULT_STEP_TIMEOUT_SECONDS;
  const runBlock = prepared.runBlockAsync!;
  const sizer = new BlockSizer(options.blockSeconds ?? 0.1);
  const end = options.first + options.count;
  const stopProgram = prepared.endProgram ? stopProgramOnAbort(options.signal, prepared.endProgram) : () => {};
  const memory = options.reuseBlocks ? new BlockMemory() : null;
  let next = options.first;
  let delivered = options.first;
  let steps = 0;
  const start = () => {
    if (next >= end || options.signal?.aborted) return null;
    const count = Math.min(sizer.size, end - next);
    const block = memory ? memory.take(next, count) : newBlock(next, count);
    next += count;
    const t0 = performance.now();
    const done = runBlock(block, stepTimeout);
    done.catch(() => {}); // awaited below; an early failure is not unhandled meanwhile
    return { block, t0, done };
  };
  try {
    let current = start();
    let previousEnd = sharedClock();
    while (current) {
      const ahead = prepared.overlapBlocks ? start() : null;
      let blockSteps: number;
      try {
        blockSteps = await current.done;
      } catch (e) {
        if (options.signal?.aborted) break; // a stopped run whose program was ended: keep what was delivered
        throw e;
      }
      const t1 = performance.now();
      // A block asked for early started being answered when the one before it was delivered.
      const begin = Math.max(current.t0, previousEnd - performance.timeOrigin);
      sizer.observe(current.block.count, (t1 - begin) / 1000);
      timing.ranBlock(current.block.count, blockSteps, performance.timeOrigin + begin, performance.timeOrigin + t1, previousEnd);
      steps += blockSteps;
      delivered += current.block.count;
      options.onBlock(current.block, blockSteps);
      memory?.giveBack(blockMemory(current.block));
      previousEnd = sharedClock();
      current = ahead ?? start();
    }
  } finally {
    stopProgram();
  }
  recordCallerTimes(timing, times0);
  return { episodes: delivered - options.first, steps, seconds: (performance.now() - started) / 1000, threads: [timing.result(sharedClock())] };
}

/** Milliseconds on the clock every thread of the process shares (worker-loop.ts stamps its messages with it). */
function sharedClock(): number {
  return performance.timeOrigin + performance.now();
}

/** The calling thread's CPU and queue time since `before` (null where the system does not tell). */
function recordCallerTimes(timing: ThreadTimingRecorder, before: ReturnType<typeof threadTimes>): void {
  const after = threadTimes();
  if (before && after) timing.callerTimes(after.cpuSeconds - before.cpuSeconds, after.queuedSeconds - before.queuedSeconds);
}

export function workerUrl(file: string): string {
  const here = fileURLToPath(import.meta.url);
  // Under the test runner this file is TypeScript source; workers always run the compiled build.
  if (here.endsWith('.ts')) return path.resolve(path.dirname(here), '../../dist/engine', file);
  return path.join(path.dirname(here), file);
}

function isProcessSpec(spec: RolloutSpec): boolean {
  return (spec.env.json as { kind?: unknown } | null)?.kind === 'process';
}

/**
 * A process environment's worker times its program out itself and asks it where it hung;
 * the pool's own watch on the thread then only backs that up (a policy of ours stuck in JS).
 */
const PROCESS_WATCH_GRACE_SECONDS = 3;

/** Ends the programs of process environments whose threads were terminated (one that hung would live on). */
function killPrograms(clocks: readonly SharedArrayBuffer[]): void {
  for (const buffer of clocks) killClockProgram(buffer);
}

/**
 * What the worker threads run. A finite MDP with a tabulated policy, compiled once in this
 * thread, goes to light workers (table-worker.ts) as its tables: they skip the definitions
 * layer and start in milliseconds. Anything else (code environments or policies) is
 * prepared by each worker from the spec (worker.ts).
 */
function workerEntry(spec: RolloutSpec, prepared: PreparedRollout | null): { url: string; data: unknown; watched: boolean } {
  if (prepared && prepared.env.kind === 'finite' && prepared.policy.kind === 'matrix') {
    const data: TableWorkerData = {
      mdp: rolloutTables(prepared.env.mdp),
      policy: prepared.policy.matrix,
      seed: spec.seed,
      start: prepared.startIndex,
      noise: spec.noise,
    };
    return { url: workerUrl('table-worker.js'), data, watched: false };
  }
  return { url: workerUrl('worker.js'), data: spec, watched: true };
}

export function rebuildError(message: Extract<FromWorker, { type: 'error' }>): Error {
  if ((message.name === 'InputError' || message.name === 'NotFoundError') && message.detail !== undefined) {
    return new InputError(message.where ?? '', message.detail);
  }
  const error = new Error(message.message);
  error.name = message.name;
  return error;
}

/**
 * Several threads. Unless `callerRuns` is false, this thread runs blocks too, between turns
 * of its event loop: it starts at once, while the worker threads are still starting, and no
 * core idles on a thread that only collects results. Each worker thread keeps two blocks in
 * hand, so it never waits for this thread to answer. Near the end blocks shrink and workers
 * hold one block at a time, so that all threads finish together.
 */
async function runThreaded(
  spec: RolloutSpec,
  prepared: PreparedRollout | null,
  options: RunOptions,
  workerCount: number,
  callerRuns: boolean,
): Promise<RunOutcome> {
  const started = performance.now();
  const runStart = performance.timeOrigin + started;
  const timings: ThreadTimingRecorder[] = [];
  const callerTiming = callerRuns ? new ThreadTimingRecorder('caller', runStart) : null;
  if (callerTiming) timings.push(callerTiming);
  const callerTimes0 = callerRuns ? threadTimes() : null;
  const end = options.first + options.count;
  const blockSeconds = options.blockSeconds ?? 0.1;
  const entry = workerEntry(spec, prepared);
  const pending = new Map<number, { block: EpisodeBlock; steps: number }>();
  /** Memory of blocks already delivered, for this thread's next blocks and sent back to workers. */
  const memory = options.reuseBlocks ? new BlockMemory() : null;
  const threads: Worker[] = [];
  let next = options.first;
  let delivered = options.first;
  let steps = 0;
  let inFlight = 0;
  let failure: Error | null = null;
  let wake: (() => void) | null = null;
  const watches: StepWatch[] = [];
  const clocks: SharedArrayBuffer[] = [];
  const stepTimeout = options.stepTimeout ?? DEFAULT_STEP_TIMEOUT_SECONDS;
  const watchTimeout = stepTimeout + (isProcessSpec(spec) ? PROCESS_WATCH_GRACE_SECONDS : 0);
  /** Set once a stopped run has waited long enough for the blocks still running. */
  let abandoned = false;

  const stopped = () => failure !== null || options.signal?.aborted === true;
  /** The next range of episodes for a thread whose blocks should be `size` long, or null when none is left. */
  const take = (size: number): { first: number; count: number } | null => {
    if (stopped() || next >= end) return null;
    const remaining = end - next;
    const count = Math.min(size, remaining, Math.max(MIN_BLOCK, Math.ceil(remaining / (2 * workerCount))));
    const first = next;
    next += count;
    return { first, count };
  };
  const fail = (error: Error) => {
    failure ??= error;
    wake?.();
  };
  const accept = (block: EpisodeBlock, blockSteps: number) => {
    pending.set(block.first, { block, steps: blockSteps });
    try {
      for (let item = pending.get(delivered); item; item = pending.get(delivered)) {
        pending.delete(delivered);
        delivered += item.block.count;
        steps += item.steps;
        options.onBlock(item.block, item.steps);
        memory?.giveBack(blockMemory(item.block));
      }
    } catch (e) {
      fail(e as Error);
    }
  };

  // Worker threads size their blocks by the time between arrivals of their results. Those
  // wait in the queue while this thread runs a block, so this thread runs short blocks: the
  // arrival times stay accurate (and the threads are never kept waiting) for the cost of a
  // few more turns of the event loop.
  // (Blocks that wait on a program leave the event loop free: they take the usual length.)
  const callerSizer = new BlockSizer(prepared?.runBlockAsync ? blockSeconds : Math.min(blockSeconds, CALLER_BLOCK_SECONDS));
  const ready = options.keep ?? options.early;
  /** What a clean end of the run needs to give a thread back to `keep`. */
  const held: { worker: Worker; clock: SharedArrayBuffer; detach: () => void; startedAt: () => number | null }[] = [];
  for (let w = callerRuns ? 1 : 0; w < workerCount; w++) {
    const started = entry.watched ? (ready?.take() ?? null) : null;
    const clock = started ? started.clock : entry.watched ? newClockBuffer() : null;
    const createdAt = started?.createdAt ?? sharedClock();
    const worker =
      started?.worker ?? new Worker(entry.url, { workerData: clock ? ({ spec: entry.data as RolloutSpec, clock } satisfies CodeWorkerData) : entry.data });
    const sizer = new BlockSizer(blockSeconds);
    const timing = new ThreadTimingRecorder('worker', runStart);
    timings.push(timing);
    let lastArrival = 0;
    let inHand = 0;
    /** False until the thread says it is ready: one that never was is given back still starting. */
    let reported = false;
    if (clock) {
      watches.push(new StepWatch(clock, () => inHand > 0));
      clocks.push(clock);
    }
    /** Gives the worker blocks up to two in hand; one near the end, where queued work could not move to an idle thread. */
    const issue = () => {
      const wanted = end - next > 4 * workerCount * sizer.size ? 2 : 1;
      while (inHand < wanted) {
        const range = take(sizer.size);
        if (!range) return;
        const spare = memory?.spare() ?? null;
        if (spare) worker.postMessage({ type: 'run', first: range.first, count: range.count, stepTimeout, spare }, [spare.returns, spare.lengths, spare.finals]);
        else worker.postMessage({ type: 'run', first: range.first, count: range.count, stepTimeout });
        inFlight++;
        inHand++;
      }
    };
    const onMessage = (message: FromWorker) => {
      if (message.type === 'ready') {
        reported = true;
        timing.ready(message, createdAt);
        lastArrival = performance.now();
        issue();
      } else if (message.type === 'block') {
        inFlight--;
        inHand--;
        // With a second block usually queued, the time between arrivals is one block's work.
        const now = performance.now();
        sizer.observe(message.count, (now - lastArrival) / 1000);
        lastArrival = now;
        timing.block(message);
        accept({ first: message.first, count: message.count, returns: message.returns, lengths: message.lengths, finals: message.finals }, message.steps);
        issue();
        wake?.();
      } else if (message.type === 'error') {
        fail(rebuildError(message));
      } // 'facts': already read by whoever asked for them (EarlyWorkers.facts)
    };
    const onError = (e: Error) => fail(e);
    if (started) started.adopt(onMessage, onError);
    else {
      worker.on('message', onMessage);
      worker.on('error', onError);
    }
    threads.push(worker);
    if (clock) {
      held.push({
        worker,
        clock,
        startedAt: () => (reported ? null : createdAt),
        detach: () => {
          worker.off('message', onMessage);
          worker.off('error', onError);
        },
      });
    }
  }
  // Threads started for more workers than this run needs (a kept set keeps them for later runs).
  if (!options.keep) options.early?.close();

  // A stopped run waits a moment for the blocks still running (a block is about 0.1 s), then
  // leaves them: a plug-in stuck in a call must not hold up Ctrl-C.
  let graceTimer: NodeJS.Timeout | undefined;
  const onAbort = () => {
    wake?.();
    graceTimer ??= setTimeout(() => {
      abandoned = true;
      prepared?.endProgram?.(); // this thread's own program, if it is stuck in a call
      wake?.();
    }, ABORT_GRACE_MS);
  };
  if (options.signal?.aborted) onAbort();
  options.signal?.addEventListener('abort', onAbort);
  const watchTimer = watches.length
    ? setInterval(() => {
        const now = performance.now();
        for (const watch of watches) {
          const hang = watch.check(now, watchTimeout);
          if (hang) fail(hang);
        }
      }, watchInterval(watchTimeout))
    : undefined;
  try {
    const sizer = callerSizer;
    let previousEnd = sharedClock();
    for (;;) {
      if (failure) throw failure;
      const range = callerRuns && prepared ? take(sizer.size) : null;
      if (range) {
        const block = memory ? memory.take(range.first, range.count) : newBlock(range.first, range.count);
        const t0 = performance.now();
        let blockSteps: number;
        if (prepared!.runBlockAsync) {
          try {
            blockSteps = await prepared!.runBlockAsync(block, stepTimeout);
          } catch (e) {
            if (options.signal?.aborted) break; // a stopped run whose program was ended
            throw e;
          }
        } else blockSteps = prepared!.runBlock(block);
        const t1 = performance.now();
        sizer.observe(range.count, (t1 - t0) / 1000);
        callerTiming?.ranBlock(range.count, blockSteps, performance.timeOrigin + t0, performance.timeOrigin + t1, previousEnd);
        accept(block, blockSteps);
        await yieldToEventLoop();
        previousEnd = sharedClock();
      } else if (!abandoned && (inFlight > 0 || (!stopped() && next < end))) {
        // Blocks are still running on other threads, or (callerRuns false) threads are starting.
        await new Promise<void>((resolve) => (wake = resolve));
        wake = null;
      } else {
        break;
      }
    }
  } finally {
    options.signal?.removeEventListener('abort', onAbort);
    clearTimeout(graceTimer);
    clearInterval(watchTimer);
    // A run that ended cleanly, every block delivered, gives its code threads back to be reused.
    const reuse = options.keep && !failure && !abandoned && !options.signal?.aborted && inFlight === 0 && held.length === threads.length;
    if (reuse) for (const h of held) options.keep!.giveBack(h.worker, h.clock, h.detach, h.startedAt());
    else {
      for (const t of threads) void t.terminate();
      killPrograms(clocks);
    }
  }
  if (callerTiming) recordCallerTimes(callerTiming, callerTimes0);
  const runEnd = sharedClock();
  return {
    episodes: delivered - options.first,
    steps,
    seconds: (performance.now() - started) / 1000,
    threads: timings.map((t) => t.result(runEnd)),
  };
}
