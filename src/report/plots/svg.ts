import type { PlotSpec } from './palette.js';

/**
 * A Vega-Lite spec to an SVG document, in Node and without a browser: Vega-Lite compiles the
 * spec to Vega, and Vega's headless view renders the scenegraph to SVG text. The same specs
 * are drawn in the page, so a figure in a paper looks like the one on screen.
 */
export async function renderSvg(spec: PlotSpec): Promise<string> {
  // Loaded on demand: the charting code is only needed by `runs plot` and the server.
  const [vega, vegaLite] = await Promise.all([import('vega'), import('vega-lite')]);
  const compiled = vegaLite.compile(spec as unknown as Parameters<typeof vegaLite.compile>[0]).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}
