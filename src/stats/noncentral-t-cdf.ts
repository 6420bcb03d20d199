import normalCdfImpl from '@stdlib/stats-base-dists-normal-cdf';

/**
 * Cumulative distribution of the noncentral t with `df` degrees of freedom and noncentrality
 * `ncp`: T = (Z + δ)/√(χ²_ν/ν). Conditioning on S = √(χ²_ν/ν) gives
 * P(T ≤ t) = E[Φ(t·S − δ)], the integral over the chi distribution used by Owen (1968,
 * "A survey of properties and applications of the noncentral t-distribution", Technometrics
 * 10:445–478, eq. 2.2; from memory). No registry package offers this CDF in stdlib-js, so we
 * integrate numerically: S has density ∝ s^{ν−1} e^{−ν s²/2}, peaked at √((ν−1)/ν) with
 * spread about 1/√(2ν); composite 16-point Gauss–Legendre over ±14/√ν around the peak (cut
 * at 0). The normalising constant is integrated on the same nodes instead of computed
 * from Γ(ν/2), so it cancels most of the quadrature error. Accurate to about 1e-10 absolute
 * for ν ≥ 1 (below 1 the chi density is unbounded at 0 and the rule loses digits, so such ν
 * are refused), checked against SciPy's nct for ν from 1 to 10⁵ and |δ| up to 250 (fixture
 * test/stats/fixtures/compare-scipy.json).
 */
export function noncentralTCdf(t: number, df: number, ncp: number): number {
  if (!(df >= 1) || !Number.isFinite(df)) throw new RangeError(`noncentralTCdf: df must be a finite number ≥ 1 (got ${df})`);
  if (!Number.isFinite(ncp)) throw new RangeError(`noncentralTCdf: ncp must be finite (got ${ncp})`);
  if (Number.isNaN(t)) return Number.NaN;
  if (t === Infinity) return 1;
  if (t === -Infinity) return 0;

  const peak = Math.sqrt((df - 1) / df);
  // The log density's curvature is −(ν − 1)/s² − ν, so the tails fall at least as fast as a
  // normal with standard deviation 1/√ν: 14 of those leave out less than e⁻⁹⁸.
  const spread = 1 / Math.sqrt(df);
  const from = Math.max(0, peak - 14 * spread);
  const to = peak + 14 * spread;
  // Φ(t·s − δ) turns over within about 1/|t| in s: keep panels narrower than that.
  const panels = Math.min(MAX_PANELS, Math.max(MIN_PANELS, Math.ceil((to - from) * Math.abs(t) * 4)));
  const logDensityAtPeak = logChiKernel(Math.max(peak, 1e-300), df);
  let mass = 0;
  let weighted = 0;
  const width = (to - from) / panels;
  for (let panel = 0; panel < panels; panel++) {
    const middle = from + (panel + 0.5) * width;
    for (let k = 0; k < NODES.length; k++) {
      const s = middle + 0.5 * width * NODES[k];
      const density = WEIGHTS[k] * Math.exp(logChiKernel(s, df) - logDensityAtPeak);
      mass += density;
      weighted += density * normalCdfImpl(t * s - ncp, 0, 1);
    }
  }
  return Math.min(1, Math.max(0, weighted / mass));
}

/** Panels of the composite rule: at least 200 (five per standard deviation of S), more for large |t|. */
const MIN_PANELS = 200;
const MAX_PANELS = 20000;

/** log of s^{ν−1} e^{−ν s²/2}, the chi density of √(χ²_ν/ν) without its constant; s > 0. */
function logChiKernel(s: number, df: number): number {
  return (df - 1) * Math.log(s) - (df * s * s) / 2;
}

/** 16-point Gauss–Legendre nodes and weights on [−1, 1] (Abramowitz & Stegun 1964, Table 25.4). */
const HALF_NODES = [
  0.0950125098376374, 0.2816035507792589, 0.4580167776572274, 0.6178762444026438, 0.755404408355003,
  0.8656312023878318, 0.9445750230732326, 0.9894009349916499,
];
const HALF_WEIGHTS = [
  0.1894506104550685, 0.1826034150449236, 0.1691565193950025, 0.1495959888165767, 0.1246289712555339,
  0.0951585116824928, 0.0622535239386479, 0.0271524594117541,
];
const NODES = [...HALF_NODES.map((x) => -x), ...HALF_NODES];
const WEIGHTS = [...HALF_WEIGHTS, ...HALF_WEIGHTS];
