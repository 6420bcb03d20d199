import { InputError } from '../errors.js';
import { requireLevel } from './interval.js';
import { betaQuantile, normalQuantile } from './quantiles.js';

/** An interval for the probability of an event, from x occurrences in n episodes. */
export interface ProportionInterval {
  readonly method: 'clopper-pearson' | 'wilson';
  readonly level: number;
  readonly low: number;
  readonly high: number;
  /** True for a one-sided upper bound (reported when the event never happened). */
  readonly oneSided: boolean;
}

function requireCounts(events: number, episodes: number): void {
  if (!(Number.isInteger(episodes) && episodes >= 1)) throw new InputError('events', `need at least one episode (got ${episodes})`);
  if (!(Number.isInteger(events) && events >= 0 && events <= episodes)) throw new InputError('events', `count must be an integer in 0..${episodes} (got ${events})`);
}

/**
 * Clopper–Pearson interval (Clopper & Pearson 1934, Biometrika 26(4):404–413): the limits are
 * Beta quantiles, [B(α/2; x, n − x + 1), B(1 − α/2; x + 1, n − x)], with 0 at x = 0 and 1 at
 * x = n. It never covers less than its level. With `oneSided`, the upper bound alone at level
 * 1 − α, which for x = 0 is 1 − α^{1/n} ≈ 3/n at 95% (the rule of three; Hanley &
 * Lippman-Hand 1983, JAMA 249(13):1743–1745).
 */
export function clopperPearson(events: number, episodes: number, level: number, oneSided = false): ProportionInterval {
  requireLevel(level);
  requireCounts(events, episodes);
  const alpha = 1 - level;
  const tail = oneSided ? alpha : alpha / 2;
  const low = oneSided || events === 0 ? 0 : betaQuantile(tail, events, episodes - events + 1);
  const high = events === episodes ? 1 : betaQuantile(1 - tail, events + 1, episodes - events);
  return { method: 'clopper-pearson', level, low, high, oneSided };
}

/**
 * Wilson score interval (Wilson 1927, JASA 22(158):209–212): centre (x + z²/2)/(n + z²),
 * half-width z/(n + z²)·√(x(n − x)/n + z²/4). Closer to its level on average than
 * Clopper–Pearson, but it can dip below it (Brown, Cai & DasGupta 2001, Statistical Science
 * 16(2):101–133).
 */
export function wilson(events: number, episodes: number, level: number): ProportionInterval {
  requireLevel(level);
  requireCounts(events, episodes);
  const z = normalQuantile(1 - (1 - level) / 2);
  const n = episodes;
  const x = events;
  const centre = (x + (z * z) / 2) / (n + z * z);
  const half = (z / (n + z * z)) * Math.sqrt((x * (n - x)) / n + (z * z) / 4);
  return { method: 'wilson', level, low: Math.max(0, centre - half), high: Math.min(1, centre + half), oneSided: false };
}

/**
 * Episodes without a single event needed before the one-sided Clopper–Pearson bound is at most
 * p: the smallest n with 1 − α^{1/n} ≤ p, i.e. n = ⌈ln α / ln(1 − p)⌉ (2,995 for p = 10⁻³ at 95%).
 */
export function episodesForZeroEventBound(p: number, level: number): number {
  requireLevel(level);
  if (!(p > 0 && p < 1)) throw new InputError('probability bound', `must be strictly between 0 and 1 (got ${p})`);
  return Math.ceil(Math.log(1 - level) / Math.log1p(-p));
}
