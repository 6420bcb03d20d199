// Base-stock policy for restock.js: each morning order enough to bring the shelf up to `level`
// crates (never more than the largest order the environment offers). Deterministic.
export default function createBaseStock(options = {}, { actions }) {
  const level = options.level ?? 8;
  if (!Number.isInteger(level) || level < 0) throw new Error(`restock-base-stock.js: option "level" must be an integer >= 0, got ${level}`);
  const largestOrder = orderSizes(actions, 'restock-base-stock.js');

  const orderFor = (stock) => Math.min(Math.max(level - stock, 0), largestOrder);
  return {
    act: (stock) => orderFor(stock),
    probabilities(stock) {
      const p = new Array(actions.length).fill(0);
      p[orderFor(stock)] = 1;
      return p;
    },
  };
}

/** Checks that action i means "order i crates" (as in restock.js) and returns the largest order. */
export function orderSizes(actions, where) {
  actions.forEach((name, i) => {
    if (name !== `order-${i}`) throw new Error(`${where}: expected action ${i} to be "order-${i}" (restock.js), got "${name}"`);
  });
  return actions.length - 1;
}
