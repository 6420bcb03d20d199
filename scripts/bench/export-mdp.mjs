// Writes a compiled finite MDP and a tabulated policy in the flat binary layout that rollout.c
// reads: the very arrays the engine's loop reads, so both loops sample the same tables.
import { readFileSync, writeFileSync } from 'node:fs';
import { startSupport } from '../../dist/engine/finite-rollout.js';

/** Bytes of `mdp` with `policy` (a PolicyMatrix) and a fixed start index (-1: the start distribution). */
export function exportFiniteMdp(mdp, policy, start = -1) {
  const support = startSupport(mdp);
  const header = new DataView(new ArrayBuffer(8 + 6 * 4 + 8));
  new Uint8Array(header.buffer).set(Buffer.from('RKMDP01\n', 'latin1'));
  [mdp.stateCount, mdp.actionCount, mdp.outcomeNext.length, support.states.length, mdp.horizon, start].forEach((v, i) =>
    header.setInt32(8 + 4 * i, v, true),
  );
  header.setFloat64(32, mdp.discount, true);
  const parts = [
    header,
    mdp.terminal,
    mdp.outcomeStart,
    mdp.outcomeNext,
    mdp.outcomeCumulative,
    mdp.outcomeReward,
    support.states,
    support.cumulative,
    policy.cumulative,
    policy.deterministicAction,
    mdp.startProbability, // not read by rollout.c; lets readFiniteMdp rebuild the exact start sums
  ];
  if (new Uint8Array(new Uint16Array([1]).buffer)[0] !== 1) throw new Error('export-mdp: the binary layout assumes a little-endian machine');
  return Buffer.concat(parts.map((p) => Buffer.from(p.buffer, p.byteOffset, p.byteLength)));
}

export function writeFiniteMdp(file, mdp, policy, start = -1) {
  writeFileSync(file, exportFiniteMdp(mdp, policy, start));
}

/** Reads a file written by writeFiniteMdp back into rollout tables and a policy matrix. */
export function readFiniteMdp(file) {
  const bytes = readFileSync(file);
  if (bytes.subarray(0, 8).toString('latin1') !== 'RKMDP01\n') throw new Error(`${file}: not an exported MDP`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const [stateCount, actionCount, outcomeCount, startCount, horizon, start] = [0, 1, 2, 3, 4, 5].map((i) => view.getInt32(8 + 4 * i, true));
  const discount = view.getFloat64(32, true);
  let offset = 40;
  const take = (Type, count) => {
    const array = new Type(count);
    new Uint8Array(array.buffer).set(bytes.subarray(offset, offset + array.byteLength));
    offset += array.byteLength;
    return array;
  };
  const pairs = stateCount * actionCount;
  const terminal = take(Uint8Array, stateCount);
  const outcomeStart = take(Int32Array, pairs + 1);
  const outcomeNext = take(Int32Array, outcomeCount);
  const outcomeCumulative = take(Float64Array, outcomeCount);
  const outcomeReward = take(Float64Array, outcomeCount);
  const startStates = take(Int32Array, startCount);
  const startCumulative = take(Float64Array, startCount);
  const cumulative = take(Float64Array, pairs);
  const deterministicAction = take(Int32Array, stateCount);
  const startProbability = take(Float64Array, stateCount);
  if (startStates.length !== startCumulative.length) throw new Error(`${file}: damaged start table`);
  const mdp = { stateCount, actionCount, terminal, startProbability, outcomeStart, outcomeNext, outcomeCumulative, outcomeReward, discount, horizon };
  const policy = { actionCount, probability: new Float64Array(pairs), cumulative, deterministicAction };
  return { mdp, policy, start };
}
