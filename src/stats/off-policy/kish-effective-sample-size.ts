/**
 * Kish's effective sample size (Kish 1965, Survey Sampling; Owen 2013, Monte Carlo
 * theory, methods and examples, ch. 9): (Σ w)²/Σ w², the number of equally weighted episodes
 * that would estimate a mean as precisely as these weighted ones. n when all weights are
 * equal, 1 when one weight dominates, 0 when every weight is 0. `count` limits the sum to the
 * first entries.
 */
export function kishEffectiveSampleSize(weights: Float64Array | number[], count: number = weights.length): number {
  let sum = 0;
  let squares = 0;
  for (let i = 0; i < count; i++) {
    sum += weights[i];
    squares += weights[i] * weights[i];
  }
  return squares > 0 ? (sum * sum) / squares : 0;
}
