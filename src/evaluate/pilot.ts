import { runEpisodes } from '../engine/pool.js';
import { prepareRollout } from '../engine/prepare.js';
import type { RolloutSpec } from '../engine/spec.js';
import { environmentFacts, type EnvironmentFacts } from './environment-facts.js';
import { ReturnsBuffer } from './returns-buffer.js';

export interface PilotOptions {
  /** A fixed pilot size; null runs an adaptive pilot (about `seconds`, at least `minEpisodes`). */
  readonly episodes: number | null;
  readonly seconds: number;
  readonly minEpisodes: number;
  readonly maxEpisodes: number;
  readonly workers: number;
}

export interface PilotResult {
  readonly facts: EnvironmentFacts;
  readonly returns: Float64Array;
  readonly seconds: number;
  /** Episodes per second once the workers were warm: what a long run would see. */
  readonly episodesPerSecond: number;
}

/**
 * A short run to measure spread and speed before planning a long one. Its size adapts to the
 * environment's speed unless fixed; its rate excludes worker start-up, which a long run pays once.
 */
export async function runPilot(spec: RolloutSpec, options: PilotOptions): Promise<PilotResult> {
  const prepared = await prepareRollout(spec);
  const facts = environmentFacts(prepared.env, prepared.policy, prepared.startIndex);
  const buffer = new ReturnsBuffer(options.episodes ?? 4096, facts.horizon);
  const stop = new AbortController();
  const started = performance.now();
  let warmAt: { seconds: number; episodes: number } | null = null;
  const outcome = await runEpisodes(spec, {
    prepared,
    first: 0,
    count: options.episodes ?? options.maxEpisodes,
    workers: options.workers,
    signal: stop.signal,
    reuseBlocks: true, // onBlock copies the returns
    onBlock: (block) => {
      buffer.append(block.returns, block.lengths);
      const seconds = (performance.now() - started) / 1000;
      if (warmAt === null && seconds > 0.25 * options.seconds) warmAt = { seconds, episodes: buffer.count };
      if (options.episodes === null && seconds >= options.seconds && buffer.count >= options.minEpisodes) stop.abort();
    },
  });
  const warm = warmAt as { seconds: number; episodes: number } | null;
  const episodesPerSecond =
    warm && outcome.seconds > warm.seconds && buffer.count > warm.episodes
      ? (buffer.count - warm.episodes) / (outcome.seconds - warm.seconds)
      : buffer.count / Math.max(outcome.seconds, 1e-9);
  return { facts, returns: buffer.view(), seconds: outcome.seconds, episodesPerSecond };
}
