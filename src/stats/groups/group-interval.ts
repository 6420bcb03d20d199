/** How a group interval was made: t on member means, the seed-level bootstrap, or Welch's for a difference. */
export type GroupIntervalMethod = 'seed-t' | 'seed-bootstrap' | 'welch' | 'naive-pooled-t';

/** A two-sided interval over training seeds (not over episodes). */
export interface GroupInterval {
  method: GroupIntervalMethod;
  level: number;
  low: number;
  high: number;
  halfWidth: number;
  /** Degrees of freedom of the t quantile used (null for the bootstrap). */
  degreesOfFreedom: number | null;
}

export function groupInterval(method: GroupIntervalMethod, level: number, low: number, high: number, degreesOfFreedom: number | null): GroupInterval {
  return { method, level, low, high, halfWidth: (high - low) / 2, degreesOfFreedom };
}
