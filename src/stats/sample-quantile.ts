/**
 * The p-quantile of values already sorted ascending, by linear interpolation between order
 * statistics: definition 7 of Hyndman & Fan (1996, "Sample quantiles in statistical packages",
 * Am. Statist. 50:361–365), the default of R and NumPy. With h = (m − 1)p (0-based),
 * Q(p) = x_⌊h⌋ + (h − ⌊h⌋)(x_⌊h⌋+1 − x_⌊h⌋); Q(0) is the minimum and Q(1) the maximum.
 * All bootstrap intervals in reckon read their endpoints through this one definition.
 */
export function sortedQuantile(sorted: Float64Array, p: number): number {
  const m = sorted.length;
  if (m === 0) throw new RangeError('sortedQuantile: no values');
  if (!(p >= 0 && p <= 1)) throw new RangeError(`sortedQuantile: p must be in [0, 1] (got ${p})`);
  const h = (m - 1) * p;
  const below = Math.floor(h);
  if (below >= m - 1) return sorted[m - 1];
  const fraction = h - below;
  return sorted[below] + fraction * (sorted[below + 1] - sorted[below]);
}
