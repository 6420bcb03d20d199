import type { EstimateProgress } from '../evaluate/estimate.js';
import { count, duration, rate, sig } from '../report/format.js';

/**
 * A one-line progress display on stderr for runs longer than a second, only when stderr is
 * a terminal (so pipes and CI logs stay clean). Redrawn at most five times a second.
 */
export class ProgressLine {
  private lastDraw = 0;
  private drawn = false;
  private analysisStarted: number | null = null;
  private readonly enabled: boolean;

  constructor(private readonly stream: NodeJS.WriteStream = process.stderr) {
    this.enabled = Boolean(stream.isTTY) && process.env.RECKON_NO_PROGRESS !== '1';
  }

  update(p: EstimateProgress): void {
    if (!this.enabled || p.seconds < 1) return;
    const now = performance.now();
    if (now - this.lastDraw < 200 && p.done < p.total) return;
    this.lastDraw = now;
    const perSecond = p.done / p.seconds;
    const left = perSecond > 0 ? (p.total - p.done) / perSecond : null;
    const hw = Number.isFinite(p.halfWidth) ? ` ± ${sig(p.halfWidth, 2)}` : '';
    let text: string;
    if (p.targetError !== null) {
      // The 1/√n law: episodes to go until the half-width meets the target, at this rate.
      const needed = Number.isFinite(p.halfWidth) ? p.done * (p.halfWidth / p.targetError) ** 2 : Number.NaN;
      const eta = Number.isFinite(needed) && perSecond > 0 ? Math.max(0, needed - p.done) / perSecond : null;
      text = `  ${count(p.done)} episodes  ${rate(perSecond)}/s  ${Number.isFinite(p.mean) ? `mean ${sig(p.mean)}` : 'half-width'}${hw} (target ±${sig(p.targetError, 2)})  ~${duration(eta)} left`;
    } else {
      text = `  ${count(p.done)}/${count(p.total)} episodes  ${rate(perSecond)}/s  mean ${sig(p.mean)}${hw}  ~${duration(left)} left`;
    }
    this.stream.write(`\r${text.padEnd(78)}`);
    this.drawn = true;
  }

  /**
   * The figures computed after the episodes (a bootstrap's resamples): shown once the analysis
   * has taken a second, redrawn at most five times a second.
   */
  analysis(step: string, done: number, total: number): void {
    if (!this.enabled) return;
    const now = performance.now();
    this.analysisStarted ??= now;
    if (now - this.analysisStarted < 1000) return;
    if (now - this.lastDraw < 200 && done < total) return;
    this.lastDraw = now;
    const perSecond = done / ((now - this.analysisStarted) / 1000);
    const text = `  analysing: ${step}, ${count(done)}/${count(total)} resamples  ~${duration(perSecond > 0 ? (total - done) / perSecond : null)} left`;
    this.stream.write(`\r${text.padEnd(78)}`);
    this.drawn = true;
  }

  clear(): void {
    if (this.drawn) this.stream.write(`\r${' '.repeat(78)}\r`);
    this.drawn = false;
  }
}
