// Draws the Vega-Lite specs the server builds (the same ones `reckon runs plot` renders to SVG)
// with the Vega and Vega-Lite browser builds served from node_modules.

/* global vega, vegaLite */

/** Renders `spec` into `element` as SVG; marks the element with how many marks were drawn. */
export async function drawPlot(element, spec) {
  const compiled = vegaLite.compile(spec).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'svg', container: element, hover: true });
  await view.runAsync();
  const marks = element.querySelectorAll('g.mark-line path, g.mark-area path, g.mark-rect path, g.mark-rule line').length;
  element.dataset.marks = String(marks);
  element.dataset.rendered = 'true';
  return view;
}
