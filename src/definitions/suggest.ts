/**
 * "Did you mean" hints for misspelt keys and names: the closest candidate by
 * Levenshtein edit distance (common practice), offered only when it is close enough
 * that the hint is more likely right than noise.
 */

/** Levenshtein distance (insert, delete, substitute each cost 1), two-row dynamic programme. */
export function editDistance(a: string, b: string): number {
  if (a === b) return 0;
  let previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  let current = new Array<number>(b.length + 1);
  for (let i = 1; i <= a.length; i++) {
    current[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const substitute = previous[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1);
      current[j] = Math.min(previous[j] + 1, current[j - 1] + 1, substitute);
    }
    [previous, current] = [current, previous];
  }
  return previous[b.length];
}

/** The candidate nearest to `word`, if within about a third of its length (at least 1, at most 3 edits). */
export function closestMatch(word: string, candidates: Iterable<string>): string | undefined {
  const allowed = Math.min(3, Math.max(1, Math.floor(word.length / 3)));
  let best: string | undefined;
  let bestDistance = Infinity;
  for (const candidate of candidates) {
    const d = editDistance(word.toLowerCase(), candidate.toLowerCase());
    if (d < bestDistance) {
      best = candidate;
      bestDistance = d;
    }
  }
  return bestDistance <= allowed ? best : undefined;
}

/** ` (did you mean "x"?)` or the empty string. */
export function didYouMean(word: string, candidates: Iterable<string>): string {
  const match = closestMatch(word, candidates);
  return match === undefined ? '' : ` (did you mean "${match}"?)`;
}
