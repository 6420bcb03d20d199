// Fixed-order policy for restock.js: order the same `amount` of crates every morning, whatever
// is on the shelf (the environment delivers only what fits). Deterministic.
import { orderSizes } from './restock-base-stock.js';

export default function createFixedOrder(options = {}, { actions }) {
  const amount = options.amount ?? 4;
  const largestOrder = orderSizes(actions, 'restock-fixed.js');
  if (!Number.isInteger(amount) || amount < 0 || amount > largestOrder) {
    throw new Error(`restock-fixed.js: option "amount" must be an integer in 0..${largestOrder}, got ${amount}`);
  }
  const distribution = actions.map((_, i) => (i === amount ? 1 : 0));
  return {
    act: () => amount,
    probabilities: () => distribution,
  };
}
