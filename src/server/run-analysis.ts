import type { EstimateResult } from '../evaluate/estimate.js';
import { analyzeStoredRun, type AnalysisOverrides } from '../evaluate/stored-estimate.js';
import { exactForRun, type RunExactValues } from '../report/plots/exact-for-run.js';
import type { Db } from '../store/open.js';
import { loadEpisodes, type RunRecord } from '../store/runs.js';

const LIMIT = 64;
/** How long figures of a run that is still growing are reused: many viewers, one computation a second. */
const LIVE_MS = 1000;

/**
 * Figures, episodes and exact values of stored runs, kept for runs that can no longer change
 * (done, failed, interrupted and not being run here), so that many people looking at one run
 * recompute nothing: a bootstrap re-analysis or an exact evaluation is done once. A running
 * run's are reused for a second, so a crowd of viewers costs one re-read a second, not one each.
 */
export class RunAnalysisCache {
  private readonly entries = new Map<string, { value: unknown; until: number }>();

  constructor(private readonly db: Db) {}

  figures(run: RunRecord, overrides: AnalysisOverrides, stable: boolean): EstimateResult {
    return this.get(`figures|${run.id}|${overrides.method ?? ''}|${overrides.level ?? ''}|${overrides.ignoreStop ? 1 : 0}|${overrides.risk ? JSON.stringify(overrides.risk) : ''}`, stable, () => analyzeStoredRun(this.db, run, overrides));
  }

  episodes(run: RunRecord, stable: boolean): { returns: Float64Array; lengths: Uint32Array } {
    return this.get(`episodes|${run.id}`, stable, () => loadEpisodes(this.db, run));
  }

  /** Exact values depend only on the definitions, so they are kept whatever the run's state. */
  exact(run: RunRecord): Promise<RunExactValues | null> {
    return this.get(`exact|${run.id}`, true, () =>
      exactForRun(
        { json: run.env.json, source: { label: run.env.label, baseDir: run.env.baseDir } },
        { json: run.policy.json, source: { label: run.policy.label, baseDir: run.policy.baseDir } },
        run.start,
      ),
    );
  }

  /** Anything else computed from a settled run, under the caller's key (`what|id`). */
  remember<T>(key: string, compute: () => T): T {
    return this.get(key, true, compute);
  }

  forget(id: string): void {
    for (const key of [...this.entries.keys()]) if (key.split('|')[1] === id) this.entries.delete(key);
  }

  private get<T>(key: string, stable: boolean, compute: () => T): T {
    const now = performance.now();
    const entry = this.entries.get(key);
    if (entry && entry.until > now) {
      this.entries.delete(key);
      this.entries.set(key, entry);
      return entry.value as T;
    }
    const value = compute();
    this.entries.delete(key);
    this.entries.set(key, { value, until: stable ? Infinity : now + LIVE_MS });
    if (this.entries.size > LIMIT) this.entries.delete(this.entries.keys().next().value as string);
    return value;
  }
}
