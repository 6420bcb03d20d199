// Restocking one shop shelf, day by day: a code environment for reckon (plain ES module, no build).
//
// Each morning the shop orders 0..maxOrder crates; they arrive before opening (as many as fit on
// the shelf, and only those are paid for). During the day customers want a Poisson number of
// crates; what is on the shelf is sold, the rest is lost. In the evening every crate left on the
// shelf costs a holding fee. State: crates on the shelf at the start of a day (an integer).
//
// Reward of a day = price * sold - unitCost * delivered - orderCost * (1 if anything delivered)
//                   - holdingCost * left over - lostSalePenalty * unmet demand.
//
// Demand is capped at `demandCap` (the most crates the shop's footfall can ask for in a day), so
// that every daily reward lies in a known range and reckon can use bounded-reward intervals.

const DEFAULTS = {
  capacity: 20,
  maxOrder: 10,
  demandMean: 4,
  demandCap: 20,
  price: 5,
  unitCost: 2,
  orderCost: 3,
  holdingCost: 0.25,
  lostSalePenalty: 1,
  initialStock: 8,
  days: 60,
  discount: 0.99,
};

export default function createRestock(options = {}) {
  const o = { ...DEFAULTS, ...options };
  for (const key of Object.keys(options)) {
    if (!(key in DEFAULTS)) throw new Error(`restock.js: unknown option "${key}" (known: ${Object.keys(DEFAULTS).join(', ')})`);
  }
  for (const key of ['capacity', 'maxOrder', 'demandCap', 'initialStock', 'days']) requireInteger(o, key, key === 'initialStock' ? 0 : 1);
  for (const key of ['price', 'unitCost', 'orderCost', 'holdingCost', 'lostSalePenalty']) requireNonNegative(o, key);
  if (!(o.demandMean > 0)) throw new Error(`restock.js: option "demandMean" must be a positive number, got ${o.demandMean}`);
  if (!(o.discount > 0 && o.discount <= 1)) throw new Error(`restock.js: option "discount" must be in (0, 1], got ${o.discount}`);
  if (o.initialStock > o.capacity) throw new Error(`restock.js: option "initialStock" (${o.initialStock}) exceeds "capacity" (${o.capacity})`);

  const actions = Array.from({ length: o.maxOrder + 1 }, (_, n) => `order-${n}`);
  const mostDelivered = Math.min(o.maxOrder, o.capacity);
  const rewardBounds = [
    -(o.unitCost * mostDelivered + (mostDelivered > 0 ? o.orderCost : 0)) - o.holdingCost * o.capacity - o.lostSalePenalty * o.demandCap,
    o.price * Math.min(o.capacity, o.demandCap),
  ];

  return {
    actions,
    discount: o.discount,
    horizon: o.days,
    rewardBounds,
    reset: () => o.initialStock,
    step(stock, action, rng, out) {
      const delivered = Math.min(action, o.capacity - stock);
      const onShelf = stock + delivered;
      // rng.poisson draws from the episode's own stream: reproducible, and shared by every policy.
      const wanted = Math.min(rng.poisson(o.demandMean), o.demandCap);
      const sold = Math.min(onShelf, wanted);
      const left = onShelf - sold;
      out.state = left;
      out.reward =
        o.price * sold -
        o.unitCost * delivered -
        (delivered > 0 ? o.orderCost : 0) -
        o.holdingCost * left -
        o.lostSalePenalty * (wanted - sold);
      out.done = false; // the season simply ends after `days` days (the horizon)
      return out;
    },
    stateName: (stock) => String(stock),
    stateFromName(name) {
      const stock = Number(name);
      if (!Number.isInteger(stock) || stock < 0 || stock > o.capacity || String(stock) !== name.trim()) {
        throw new Error(`restock.js: state "${name}" is not a stock level 0..${o.capacity}`);
      }
      return stock;
    },
  };
}

function requireInteger(o, key, min) {
  if (!Number.isInteger(o[key]) || o[key] < min) throw new Error(`restock.js: option "${key}" must be an integer >= ${min}, got ${o[key]}`);
}

function requireNonNegative(o, key) {
  if (!(typeof o[key] === 'number' && o[key] >= 0 && Number.isFinite(o[key]))) {
    throw new Error(`restock.js: option "${key}" must be a number >= 0, got ${o[key]}`);
  }
}
