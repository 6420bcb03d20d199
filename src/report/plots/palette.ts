/**
 * The look shared by every plot, in the page and in `runs plot` SVGs: plain axes, one
 * typeface, and colours from the Okabe–Ito palette, chosen to stay distinguishable under the
 * common colour-vision deficiencies (Okabe & Ito 2008, "Color Universal Design").
 */
export const COLOURS = {
  blue: '#0072B2',
  skyBlue: '#56B4E9',
  green: '#009E73',
  orange: '#E69F00',
  vermillion: '#D55E00',
  purple: '#CC79A7',
  black: '#000000',
  grey: '#7a7a7a',
} as const;

/** Vega-Lite `config` for every spec: legible sizes, light grid, no chart border. */
export const PLOT_CONFIG = {
  font: 'DejaVu Sans, Verdana, sans-serif',
  view: { stroke: null },
  axis: { labelFontSize: 11, titleFontSize: 12, titleFontWeight: 'normal', gridColor: '#e4e4e4', domainColor: '#555', tickColor: '#555' },
  title: { fontSize: 14, fontWeight: 'normal', anchor: 'start', subtitleFontSize: 11, subtitleColor: '#444' },
  legend: { labelFontSize: 11, titleFontSize: 11, titleFontWeight: 'normal' },
  background: 'white',
} as const;

export const VEGA_LITE_SCHEMA = 'https://vega.github.io/schema/vega-lite/v6.json';

/** A Vega-Lite spec as plain JSON (what the page renders and `runs plot` turns into SVG). */
export type PlotSpec = Record<string, unknown>;

/**
 * A subtitle of several clauses ("a; b; c") as one line each: text widths in an SVG drawn
 * without a browser are estimated generously, and one long line would be cut short.
 */
export function titleLines(text: string): string[] {
  return text.split('; ').map((part, i, all) => (i < all.length - 1 ? `${part};` : part));
}
