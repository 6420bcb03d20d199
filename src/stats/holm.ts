/**
 * Holm's step-down adjusted p-values (Holm 1979, "A simple sequentially rejective multiple test
 * procedure", Scand. J. Statist. 6:65–70; docs/methods.md §8.3): with p_(1) ≤ … ≤ p_(m),
 * p̃_(i) = max_{j ≤ i} min(1, (m − j + 1) p_(j)). Rejecting where p̃ ≤ α controls the
 * family-wise error rate at α under any dependence between the tests, which pairwise
 * comparisons on common random numbers certainly have. Returned in the input order; equal
 * p-values keep their input order when sorted, which does not change the result.
 */
export function holmAdjust(pValues: readonly number[]): number[] {
  const m = pValues.length;
  for (let i = 0; i < m; i++) {
    const p = pValues[i];
    if (!(p >= 0 && p <= 1)) throw new RangeError(`holmAdjust: p-value ${i} must be in [0, 1] (got ${p})`);
  }
  const order = pValues.map((_, i) => i).sort((i, j) => pValues[i] - pValues[j] || i - j);
  const adjusted = new Array<number>(m);
  let runningMax = 0;
  for (let rank = 0; rank < m; rank++) {
    const index = order[rank];
    runningMax = Math.max(runningMax, Math.min(1, (m - rank) * pValues[index]));
    adjusted[index] = runningMax;
  }
  return adjusted;
}
