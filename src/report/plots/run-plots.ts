import type { RunningInterval } from '../../stats/index.js';
import { cdfSeries, cdfSpec } from './cdf.js';
import { convergenceSeries, convergenceSpec, sequenceSeries } from './convergence.js';
import type { RunExactValues } from './exact-for-run.js';
import { histogramBins, histogramSpec } from './histogram.js';
import { COLOURS, type PlotSpec } from './palette.js';
import { valueMapCells, valueMapSpec } from './value-map.js';

export const RUN_PLOT_KINDS = ['convergence', 'histogram', 'lengths', 'value-map', 'cdf'] as const;
export type RunPlotKind = (typeof RUN_PLOT_KINDS)[number];

export interface RunPlotInput {
  readonly runId: string;
  readonly envLabel: string;
  readonly policyLabel: string;
  readonly level: number;
  readonly returns: Float64Array;
  readonly lengths: Uint32Array;
  readonly exact: RunExactValues | null;
  /** Draw the policy's likeliest moves on the value map. */
  readonly arrows?: boolean;
  /** The confidence sequence the run stopped on, drawn instead of a t band. */
  readonly sequence?: { readonly method: string; readonly make: () => RunningInterval } | null;
}

/** The plot of one kind for a stored run, or null when it does not apply (a value map of a code environment). */
export function runPlotSpec(kind: RunPlotKind, input: RunPlotInput, size: { width?: number; height?: number } = {}): PlotSpec | null {
  // File names, not whole paths: the title must fit above the plot.
  const policy = shortName(input.policyLabel);
  const run = `on ${shortName(input.envLabel)}, run ${input.runId}, ${input.returns.length.toLocaleString('en-US')} episodes`;
  switch (kind) {
    case 'convergence':
      return convergenceSpec(input.sequence ? sequenceSeries(input.returns, input.sequence.make()) : convergenceSeries(input.returns, input.level), {
        title: [`Convergence: ${policy}`, run],
        level: input.level,
        sequence: input.sequence?.method,
        exact: input.exact?.value ?? null,
        ...size,
      });
    case 'histogram': {
      const mean = input.returns.reduce((s, x) => s + x, 0) / Math.max(1, input.returns.length);
      return histogramSpec(histogramBins(input.returns), {
        title: [`Returns: ${policy}`, run],
        xTitle: 'discounted return',
        marker: input.returns.length > 0 ? { value: mean, label: 'sample mean' } : null,
        ...size,
      });
    }
    case 'lengths':
      return histogramSpec(histogramBins(input.lengths, { integer: true }), {
        title: [`Episode lengths: ${policy}`, run],
        xTitle: 'steps in the episode',
        colour: COLOURS.purple,
        ...size,
      });
    case 'cdf':
      return cdfSpec(cdfSeries(input.returns, input.level), { title: [`Distribution of returns: ${policy}`, run], level: input.level, ...size });
    case 'value-map': {
      if (!input.exact || !input.exact.mdp.grid) return null;
      const cells = valueMapCells(input.exact.mdp, input.exact.states, { policy: input.arrows ? input.exact.policy : null, start: input.exact.start });
      const marks = [
        'terminals outlined',
        cells.some((c) => c.start) ? 'S: start' : '',
        cells.some((c) => c.portal !== null) ? '↪x: portal to the cell x' : '',
        input.arrows ? "arrows: the policy's likeliest moves (*: all alike)" : '',
      ].filter(Boolean);
      return valueMapSpec(cells, {
        title: [`State values: ${shortName(input.policyLabel)}`, `on ${shortName(input.envLabel)}`],
        subtitle: `exact value of each cell (horizon ${input.exact.mdp.horizon}); ${marks.join('; ')}`,
      });
    }
  }
}

function shortName(label: string): string {
  return label.split(/[\\/]/).pop() || label;
}
