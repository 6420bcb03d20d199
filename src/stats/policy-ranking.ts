/**
 * Ranks policies by mean return, best (highest) first, with standard competition ranking
 * ("1224": equal means share a rank and the next rank is skipped; common practice). Returns
 * the policy indices in rank order and each policy's rank. A rank says nothing about
 * significance; read it with the pairwise adjusted p-values.
 */
export function rankByMean(means: readonly number[]): { order: number[]; rank: number[] } {
  means.forEach((m, i) => {
    if (!Number.isFinite(m)) throw new RangeError(`rankByMean: mean ${i} is not finite (${m})`);
  });
  const order = means.map((_, i) => i).sort((i, j) => means[j] - means[i] || i - j);
  const rank = new Array<number>(means.length);
  order.forEach((policy, position) => {
    const previous = order[position - 1];
    rank[policy] = position > 0 && means[previous] === means[policy] ? rank[previous] : position + 1;
  });
  return { order, rank };
}
