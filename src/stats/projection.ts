import { InputError } from '../errors.js';
import { bernsteinHalfWidth } from './bernstein.js';
import { requireLevel, type CiMethod } from './interval.js';
import { normalQuantile, tQuantile } from './quantiles.js';
import { requireBounds, type ReturnBounds } from './return-bounds.js';
import type { ReturnSummary } from './summary.js';

/**
 * How many episodes an interval method needs to reach a target half-width ε.
 *
 * The spread s is the pilot's point estimate (the sample standard deviation of the episodes
 * run so far), not an upper confidence limit for σ; so the projected n reaches ε only about
 * half the time (docs/methods.md §5). No method projects fewer than 2 episodes, the least any
 * interval accepts. When all returns so far are equal (s = 0) the spread-based rules have
 * nothing to scale and answer the current n (at least 2) instead of dividing by zero.
 */

/** Which law a projection follows; reports show it so a reader knows what the number means. */
export type ProjectionRule = 'z' | 't' | 'hoeffding' | 'bernstein' | 'inverse-sqrt-n';

export function projectionRuleFor(method: CiMethod): ProjectionRule {
  switch (method) {
    case 'normal':
      return 'z';
    case 't':
      return 't';
    case 'hoeffding':
      return 'hoeffding';
    case 'bernstein':
      return 'bernstein';
    case 'bootstrap':
    case 'bootstrap-percentile':
      return 'inverse-sqrt-n';
  }
}

/** Iterations allowed before the t rule falls back to bisection. */
const MAX_T_ITERATIONS = 60;

/**
 * Episodes needed so that `method`'s half-width at `level` is at most `epsilon`:
 * - normal: n = ⌈(z_{1−α/2} s/ε)²⌉;
 * - t: start from the z answer and iterate n ← ⌈(t_{1−α/2, n−1} s/ε)²⌉ to a fixed point, which
 *   is the smallest n meeting ε (t quantiles fall as n grows). With few episodes the
 *   iteration can cycle (s = 1, ε = 2: 2 → 41 → 2); then the larger value of the cycle meets
 *   ε and bisection finds the smallest n that does (4 in that example);
 * - hoeffding: n = ⌈(b − a)² ln(2/α)/(2ε²)⌉ (Hoeffding 1963, Thm 2);
 * - bernstein: the smallest n whose Maurer–Pontil half-width with the current s² is ≤ ε,
 *   found by doubling then bisection (the half-width decreases in n);
 * - bootstrap methods: the 1/√n law applied to the current half-width, ⌈n (hw/ε)²⌉; requires
 *   `currentHalfWidth`.
 * Formulas and check values: docs/methods.md §5 (the z and t iteration is common practice for
 * sample-size planning).
 */
export function episodesNeeded(
  method: CiMethod,
  summary: ReturnSummary,
  epsilon: number,
  level: number,
  bounds?: ReturnBounds | null,
  currentHalfWidth?: number,
): number {
  requireLevel(level);
  requireTarget(epsilon);
  const alpha = 1 - level;
  const unchanged = Math.max(summary.n, 2);
  switch (method) {
    case 'normal':
      return summary.std === 0 ? unchanged : zEpisodes(summary.std, epsilon, alpha);
    case 't':
      return summary.std === 0 ? unchanged : tEpisodes(summary.std, epsilon, alpha);
    case 'hoeffding': {
      const [a, b] = requireBounds('hoeffding', bounds, summary);
      return atLeastTwo(((b - a) ** 2 * Math.log(2 / alpha)) / (2 * epsilon * epsilon));
    }
    case 'bernstein': {
      const [a, b] = requireBounds('bernstein', bounds, summary);
      return bernsteinEpisodes(summary.variance, b - a, alpha, epsilon);
    }
    case 'bootstrap':
    case 'bootstrap-percentile': {
      if (currentHalfWidth === undefined || !(currentHalfWidth >= 0) || !Number.isFinite(currentHalfWidth)) {
        throw new RangeError(`episodesNeeded: ${method} needs the current half-width (got ${currentHalfWidth})`);
      }
      if (currentHalfWidth === 0) return unchanged;
      return atLeastTwo(summary.n * (currentHalfWidth / epsilon) ** 2);
    }
  }
}

function requireTarget(epsilon: number): void {
  if (!(epsilon > 0) || !Number.isFinite(epsilon)) {
    throw new InputError('target half-width', `must be a positive number (got ${epsilon})`);
  }
}

function atLeastTwo(n: number): number {
  return Math.max(2, Math.ceil(n));
}

function zEpisodes(std: number, epsilon: number, alpha: number): number {
  return atLeastTwo(((normalQuantile(1 - alpha / 2) * std) / epsilon) ** 2);
}

function tEpisodes(std: number, epsilon: number, alpha: number): number {
  const p = 1 - alpha / 2;
  const tRule = (n: number) => atLeastTwo(((tQuantile(p, n - 1) * std) / epsilon) ** 2);
  let n = zEpisodes(std, epsilon, alpha);
  let previous = Number.NaN;
  for (let i = 0; i < MAX_T_ITERATIONS; i++) {
    const next = tRule(n);
    if (next === n) return n;
    if (next === previous) break;
    previous = n;
    n = next;
  }
  // No fixed point (a 2-cycle, typical for a few episodes) or too slow: the larger of the last
  // two values meets ε (it is at least the rule's value for itself); bisect down to the
  // smallest n that does, which is what a fixed point would have been.
  const meets = (m: number) => tRule(m) <= m;
  let passing = Math.max(n, previous);
  let failing = 1;
  while (passing - failing > 1) {
    const middle = Math.floor((failing + passing) / 2);
    if (meets(middle)) passing = middle;
    else failing = middle;
  }
  return passing;
}

function bernsteinEpisodes(variance: number, range: number, alpha: number, epsilon: number): number {
  const meets = (n: number) => bernsteinHalfWidth(n, variance, range, alpha) <= epsilon;
  let failing = 1; // n = 1 never qualifies: the bound needs n ≥ 2
  let passing = 2;
  while (!meets(passing)) {
    failing = passing;
    passing *= 2;
    if (passing > Number.MAX_SAFE_INTEGER) return Infinity; // ε too small to reach in any run
  }
  while (passing - failing > 1) {
    const middle = Math.floor((failing + passing) / 2);
    if (meets(middle)) passing = middle;
    else failing = middle;
  }
  return passing;
}

/** One line of a projection table; the snake_case keys are part of the JSON output. */
export interface ProjectionRow {
  half_width: number;
  episodes_needed: number;
  /** max(0, episodes_needed − n). */
  more_episodes: number;
  /** more_episodes at the measured rate, or null when no rate is known. */
  seconds: number | null;
}

export interface ProjectionRequest {
  method: CiMethod;
  summary: ReturnSummary;
  level: number;
  /** Half-width of the interval reported now; the bootstrap rule scales from it. */
  currentHalfWidth: number;
  bounds?: ReturnBounds | null;
  /** Target half-widths; default {@link defaultTargets}. */
  targets?: readonly number[];
  /** Measured episodes per second, if known. */
  episodesPerSecond?: number | null;
}

/**
 * Targets used when the user names none: the current half-width halved, fifthed and tenthed.
 * Empty when the current half-width is 0 or not finite (nothing narrower to aim for).
 */
export function defaultTargets(currentHalfWidth: number): number[] {
  if (!(currentHalfWidth > 0) || !Number.isFinite(currentHalfWidth)) return [];
  return [currentHalfWidth / 2, currentHalfWidth / 5, currentHalfWidth / 10];
}

/** Episodes (and, given a rate, seconds) needed for each target half-width. */
export function projectionTable(request: ProjectionRequest): ProjectionRow[] {
  const { method, summary, level, currentHalfWidth, bounds } = request;
  const targets = request.targets ?? defaultTargets(currentHalfWidth);
  const rate = request.episodesPerSecond;
  const rateKnown = rate != null && rate > 0 && Number.isFinite(rate);
  return targets.map((target) => {
    const needed = episodesNeeded(method, summary, target, level, bounds, currentHalfWidth);
    const more = Math.max(0, needed - summary.n);
    return {
      half_width: target,
      episodes_needed: needed,
      more_episodes: more,
      seconds: rateKnown ? more / rate : null,
    };
  });
}
