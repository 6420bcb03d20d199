import type { PolicyChain } from './policy-chain.js';

/**
 * Non-terminal states from which the episode ends with probability 1 under the policy
 * (undiscounted value exists). In a finite chain that holds exactly when every state
 * reachable from s can still reach a terminal (Kemeny & Snell 1960, absorbing chains). So:
 * mark the states that can reach a terminal (backward search from the states that end in one
 * step); the rest are trapped; every state that can reach a trapped state is improper too.
 * Returns the proper states, ascending.
 */
export function properStates(chain: PolicyChain): Int32Array {
  const { stateCount, liveStates, endsInOneStep } = chain;
  const reverse = reverseEdges(chain);

  const canEnd = new Uint8Array(stateCount);
  const queue = new Int32Array(stateCount);
  let tail = 0;
  for (const s of liveStates) {
    if (endsInOneStep[s] !== 0) {
      canEnd[s] = 1;
      queue[tail++] = s;
    }
  }
  spreadBackward(reverse, canEnd, queue, 0, tail);

  const improper = new Uint8Array(stateCount);
  tail = 0;
  for (const s of liveStates) {
    if (canEnd[s] === 0) {
      improper[s] = 1;
      queue[tail++] = s;
    }
  }
  spreadBackward(reverse, improper, queue, 0, tail);

  const proper: number[] = [];
  for (const s of liveStates) if (improper[s] === 0) proper.push(s);
  return Int32Array.from(proper);
}

interface ReverseEdges {
  readonly start: Int32Array;
  readonly source: Int32Array;
}

/** Predecessor lists (transpose of the chain's rows). */
function reverseEdges(chain: PolicyChain): ReverseEdges {
  const { stateCount, liveStates, rowStart, edgeNext } = chain;
  const start = new Int32Array(stateCount + 1);
  for (let e = 0; e < edgeNext.length; e++) start[edgeNext[e] + 1]++;
  for (let s = 0; s < stateCount; s++) start[s + 1] += start[s];
  const fill = start.slice(0, stateCount);
  const source = new Int32Array(edgeNext.length);
  for (const s of liveStates) {
    for (let e = rowStart[s]; e < rowStart[s + 1]; e++) source[fill[edgeNext[e]]++] = s;
  }
  return { start, source };
}

/** Breadth-first search over predecessors from the queued states, marking each state reached. */
function spreadBackward(reverse: ReverseEdges, mark: Uint8Array, queue: Int32Array, head: number, tail: number): void {
  while (head < tail) {
    const s = queue[head++];
    for (let k = reverse.start[s]; k < reverse.start[s + 1]; k++) {
      const before = reverse.source[k];
      if (mark[before] === 0) {
        mark[before] = 1;
        queue[tail++] = before;
      }
    }
  }
}
