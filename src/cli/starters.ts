/**
 * The commented starter modules `reckon new` writes: a code environment (a ski lift's queue)
 * and a code policy (weighted random choice), each in JavaScript or TypeScript. They use the
 * named distributions of the rng they are handed, so they stay reproducible as they grow.
 */

export interface StarterOptions {
  /** Module name without extension, e.g. "lift-queue". */
  name: string;
  typescript: boolean;
  /** Import path of src/plugin.ts as seen from the module's folder (TypeScript only). */
  pluginImport: string;
}

/** `text` with TypeScript-only annotations: `«…»` kept for TypeScript, removed for JavaScript. */
function variant(text: string, typescript: boolean): string {
  return typescript ? text.replace(/«([^»]*)»/g, '$1') : text.replace(/«[^»]*»/g, '');
}

export function environmentStarter(o: StarterOptions): string {
  const header = o.typescript
    ? `import type { Environment, Rng, StepResult } from '${o.pluginImport}';\n\n`
    : '';
  return variant(
    `// ${o.name}: a code environment for reckon, written by \`reckon new env\`. Edit freely.
//
// The model: the queue at a ski lift's bottom station through one day, in 10-minute slots.
// Each slot skiers join the queue (Poisson, in waves of varying size); the operator runs one chair
// line or two; every chair that comes round boards a skier with probability \`boardingRate\`
// (empty chairs happen). Reward per slot = skiers carried - cost of a second line - a waiting
// penalty per skier still queueing. State: the number of skiers in the queue.
//
// Randomness: use only the \`rng\` you are handed (rng.poisson, rng.binomial, rng.normal, ...,
// see src/plugin.ts). Then a seed gives the same figures whatever the workers, and two policies
// face the same skiers (common random numbers). Never use Math.random here.
${header}«interface Options {
  meanArrivals?: number;
  chairsPerSlot?: number;
  boardingRate?: number;
  secondLineCost?: number;
  waitingCost?: number;
  maxQueue?: number;
  slots?: number;
}

»const DEFAULTS = {
  meanArrivals: 30, // skiers per slot, averaged over the day
  chairsPerSlot: 24, // chairs one line brings round in a slot
  boardingRate: 0.85, // chance a chair is boarded when skiers are waiting
  secondLineCost: 8, // cost of running the second line for a slot
  waitingCost: 0.2, // per skier left in the queue at the end of a slot
  maxQueue: 300, // skiers beyond this give up and go elsewhere
  slots: 48, // an 8-hour day
};

export default function create(options«: Options» = {})«: Environment<number>» {
  const o = { ...DEFAULTS, ...options };
  for (const key of Object.keys(options)) {
    if (!(key in DEFAULTS)) throw new Error(\`${o.name}: unknown option "\${key}" (known: \${Object.keys(DEFAULTS).join(', ')})\`);
  }
  if (!(o.meanArrivals > 0)) throw new Error(\`${o.name}: option "meanArrivals" must be > 0, got \${o.meanArrivals}\`);
  if (!(o.boardingRate >= 0 && o.boardingRate <= 1)) throw new Error(\`${o.name}: option "boardingRate" must be in [0, 1], got \${o.boardingRate}\`);

  return {
    actions: ['one-line', 'two-lines'],
    discount: 1, // a day's total; with discount 1 a horizon is required
    horizon: o.slots,
    // The smallest and largest reward of one slot: lets reckon use bounded intervals.
    rewardBounds: [-o.secondLineCost - o.waitingCost * o.maxQueue, 2 * o.chairsPerSlot],
    reset: (rng«: Rng») => rng.poisson(o.meanArrivals / 2), // the first skiers at opening
    step(queue«: number», action«: number», rng«: Rng», out«: StepResult<number>») {
      // Crowds come in waves (a bus, a ski school): this slot's rush, a factor around 1.
      const busy = Math.max(0.2, rng.normal(1, 0.25));
      const arrivals = rng.poisson(o.meanArrivals * busy);
      const waiting = Math.min(queue + arrivals, o.maxQueue);
      const chairs = (action + 1) * o.chairsPerSlot;
      const carried = Math.min(waiting, rng.binomial(chairs, o.boardingRate));
      out.state = waiting - carried;
      out.reward = carried - (action === 1 ? o.secondLineCost : 0) - o.waitingCost * out.state;
      out.done = false; // the day ends at the horizon
      return out; // filling \`out\` avoids an allocation per step
    },
    stateName: (queue«: number») => String(queue),
    stateFromName(name«: string») {
      const queue = Number(name);
      if (!Number.isInteger(queue) || queue < 0 || queue > o.maxQueue) throw new Error(\`${o.name}: state "\${name}" is not a queue length 0..\${o.maxQueue}\`);
      return queue;
    },
  };
}
`,
    o.typescript,
  );
}

export function policyStarter(o: StarterOptions): string {
  const header = o.typescript ? `import type { Policy, PolicyContext, Rng } from '${o.pluginImport}';\n\n` : '';
  return variant(
    `// ${o.name}: a code policy for reckon, written by \`reckon new policy\`. Edit freely.
//
// Chooses an action at random with fixed weights, given by name in the options
// (\`"weights": {"two-lines": 3}\`); actions not named weigh 1. It fits any environment, since
// it looks only at the action names. To make it depend on the state, change \`act\`: e.g.
// \`if (state > 60) return 'two-lines';\` (return an action's index or its name).
//
// Randomness: use only the \`rng\` you are handed (here rng.categorical); it is the policy's own
// stream, separate from the environment's, so every policy meets the same environment noise.
${header}«interface Options {
  weights?: Record<string, number>;
}

»export default function create(options«: Options», { actions }«: PolicyContext»)«: Policy» {
  const given = options.weights ?? {};
  for (const name of Object.keys(given)) {
    if (!actions.includes(name)) throw new Error(\`${o.name}: "weights" names "\${name}", which is not an action (actions: \${actions.join(', ')})\`);
  }
  const weights = actions.map((name) => given[name] ?? 1);
  const total = weights.reduce((sum, w) => sum + w, 0);
  if (!(total > 0) || weights.some((w) => !(w >= 0))) throw new Error(\`${o.name}: "weights" must be numbers >= 0 with a positive sum\`);

  return {
    act(state«: unknown», rng«: Rng») {
      return rng.categorical(weights); // an index into \`actions\`
    },
    // The action distribution in a state; lets \`reckon exact\` evaluate this policy too.
    probabilities: () => weights.map((w) => w / total),
  };
}
`,
    o.typescript,
  );
}
