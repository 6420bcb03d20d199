import { histogramBins, histogramSpec } from './histogram.js';
import type { PlotSpec } from './palette.js';

/** The histogram of an off-policy run's importance weights, with their expected mean 1 marked: for the page and `runs plot`. */
export function offPolicyWeightsSpec(weights: ArrayLike<number>, runId: string): PlotSpec {
  return histogramSpec(histogramBins(weights), {
    title: `Importance weights of the logged episodes (run ${runId})`,
    xTitle: 'weight W = Π π(a|s)/μ(a|s)',
    marker: { value: 1, label: 'their expected mean, 1' },
  });
}
