import { normalQuantile } from '../stats/index.js';

/**
 * Welford's streaming mean and variance (Welford 1962, Technometrics 4:419–420), for the
 * progress line only: final figures are recomputed from the returns in episode order.
 */
export class RunningMoments {
  n = 0;
  mean = 0;
  private m2 = 0;

  addAll(values: Float64Array): void {
    for (let i = 0; i < values.length; i++) {
      const x = values[i];
      this.n++;
      const delta = x - this.mean;
      this.mean += delta / this.n;
      this.m2 += delta * (x - this.mean);
    }
  }

  /** Normal-approximation half-width at `level`; NaN before two values. */
  halfWidth(level: number): number {
    if (this.n < 2) return Number.NaN;
    return normalQuantile(1 - (1 - level) / 2) * Math.sqrt(this.m2 / (this.n - 1) / this.n);
  }
}
