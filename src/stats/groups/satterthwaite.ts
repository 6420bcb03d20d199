/**
 * Welch–Satterthwaite degrees of freedom of a sum of variance estimates, each [value, df]
 * (Satterthwaite 1946, Biometrics Bulletin 2:110–114): (Σ v)²/Σ (v²/df). With no shared
 * noise it is K − 1; when the well-measured shared term dominates, it grows towards n − 1
 * (docs/methods.md §15.3 shows the coverage with and without it).
 */
export function satterthwaite(...parts: [number, number][]): number {
  let sum = 0;
  let denominator = 0;
  for (const [value, df] of parts) {
    if (value <= 0) continue;
    sum += value;
    denominator += (value * value) / df;
  }
  const smallest = Math.min(...parts.map(([, df]) => df));
  return denominator > 0 ? Math.max(smallest, (sum * sum) / denominator) : smallest;
}
