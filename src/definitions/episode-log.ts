/**
 * Reads a logged-episode file (JSON Lines, see episode-log-schema.ts) line by line, never
 * the whole file at once, and checks it strictly: every refusal is one line that names the
 * file and the line. Steps may be interleaved across episodes; the result holds them in
 * flat arrays, episode after episode, each in step order.
 */
import { createHash } from 'node:crypto';
import { createReadStream, statSync } from 'node:fs';
import { createInterface } from 'node:readline';
import { InputError } from '../errors.js';
import { describeValue, formatNumber } from './describe-value.js';
import { labelName, logHeaderSchema, logStepSchema, plainStep, type LogHeader, type LogStep } from './episode-log-schema.js';
import { describeIssues } from './issues.js';
import { findJsonSyntaxError } from './json-syntax.js';

/** `end` codes per episode. */
export const END_TERMINAL = 1;
export const END_TRUNCATED = 2;

/** A next state that the log does not give (the last step of a truncated episode without next_state). */
export const NEXT_UNKNOWN = -1;
/** The episode ended in a terminal state: nothing follows, its value is 0. */
export const NEXT_TERMINAL = -2;

export interface EpisodeLog {
  readonly label: string;
  readonly bytes: number;
  /** SHA-256 of the file's bytes, hex. */
  readonly sha256: string;
  readonly header: LogHeader | null;
  /** Action names: the header's `actions` in order, else in order of first appearance. */
  readonly actionNames: readonly string[];
  /** Distinct state names (logged states and next states) in order of first appearance. */
  readonly stateNames: readonly string[];
  /** The line on which each state first appears. */
  readonly stateLine: Int32Array;
  readonly episodeIds: readonly string[];
  /** Steps of episode i are `episodeStart[i] .. episodeStart[i + 1]`; length episodes + 1. */
  readonly episodeStart: Int32Array;
  readonly episodeEnd: Uint8Array;
  readonly state: Int32Array;
  readonly action: Int32Array;
  readonly reward: Float64Array;
  readonly behaviourProb: Float64Array;
  /** The state after each step: an index, {@link NEXT_TERMINAL} or {@link NEXT_UNKNOWN}. */
  readonly nextState: Int32Array;
  /** The file line of each step, for messages. */
  readonly line: Int32Array;
  /**
   * Per state × action, from `behaviour_probs`: the smallest positive probability logged for
   * that action in that state, 0 where no logged distribution gave it any, NaN where no line
   * gave the state's whole distribution.
   */
  readonly behaviourDistribution: Float64Array;
}

/** Tolerance on a logged distribution's sum and on its agreement with behaviour_prob (logged floats). */
const LOGGED_SUM_TOLERANCE = 1e-6;

class Growable {
  private data: Float64Array;
  length = 0;
  constructor(initial = 1024) {
    this.data = new Float64Array(initial);
  }
  push(x: number): void {
    if (this.length === this.data.length) {
      const bigger = new Float64Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = x;
  }
  get(i: number): number {
    return this.data[i];
  }
}

/** Reads and checks a log. `where` labels messages (default: the path as given). */
export async function readEpisodeLog(path: string, where: string = path): Promise<EpisodeLog> {
  let bytes: number;
  try {
    bytes = statSync(path).size;
  } catch (e) {
    throw new InputError(where, `cannot read the log: ${(e as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (e as Error).message}`);
  }
  const hash = createHash('sha256');
  const stream = createReadStream(path);
  stream.on('data', (chunk) => hash.update(chunk));
  const lines = createInterface({ input: stream, crlfDelay: Infinity });
  const builder = new LogBuilder(where);
  let lineNumber = 0;
  try {
    for await (const text of lines) {
      lineNumber++;
      builder.add(text, lineNumber);
    }
  } catch (e) {
    stream.destroy();
    if (e instanceof InputError) throw e;
    throw new InputError(where, `cannot read the log: ${(e as Error).message}`);
  }
  return builder.finish(bytes, hash.digest('hex'));
}

/** Reads a log held in memory (tests, HTTP bodies): the same checks, line by line. */
export function parseEpisodeLog(text: string, where: string): EpisodeLog {
  const builder = new LogBuilder(where);
  const lines = text.split(/\r?\n/);
  lines.forEach((line, i) => builder.add(line, i + 1));
  return builder.finish(Buffer.byteLength(text), createHash('sha256').update(text).digest('hex'));
}

class LogBuilder {
  private header: LogHeader | null = null;
  private sawStep = false;
  private readonly actionIndex = new Map<string, number>();
  private readonly actionNames: string[] = [];
  private fixedActions = false;
  private readonly stateIndex = new Map<string, number>();
  private readonly stateNames: string[] = [];
  private readonly stateLines: number[] = [];
  private readonly episodeIndex = new Map<string, number>();
  private readonly episodeIds: string[] = [];
  private readonly episodeSteps: number[] = [];
  private readonly stepEpisode = new Growable();
  private readonly stepT = new Growable();
  private readonly stepState = new Growable();
  private readonly stepAction = new Growable();
  private readonly stepReward = new Growable();
  private readonly stepProb = new Growable();
  private readonly stepNext = new Growable();
  private readonly stepEnd = new Growable();
  private readonly stepLine = new Growable();
  /** state → smallest positive probability logged per action (∞: none yet), from behaviour_probs. */
  private readonly distributions = new Map<number, Float64Array>();

  constructor(private readonly where: string) {}

  private fail(line: number, detail: string): never {
    throw new InputError(`${this.where}: line ${line}`, detail);
  }

  add(text: string, line: number): void {
    if (text.trim() === '') return;
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch {
      const found = findJsonSyntaxError(text);
      this.fail(line, found ? `column ${found.offset + 1}: ${found.message}` : 'not valid JSON');
    }
    if (json === null || typeof json !== 'object' || Array.isArray(json)) {
      this.fail(line, `expected one JSON object a line (got ${describeValue(json)})`);
    }
    const kind = (json as { kind?: unknown }).kind;
    if (kind === 'header') return this.addHeader(json, line);
    const plain = plainStep(json as Record<string, unknown>);
    if (plain) return this.addStep(plain, line);
    const parsed = logStepSchema.safeParse(json);
    if (!parsed.success) this.fail(line, describeIssues(parsed.error.issues, json));
    this.addStep(parsed.data, line);
  }

  private addHeader(json: unknown, line: number): void {
    if (this.header || this.sawStep) this.fail(line, 'a header may only be the first line of the log');
    const parsed = logHeaderSchema.safeParse(json);
    if (!parsed.success) this.fail(line, describeIssues(parsed.error.issues, json));
    this.header = parsed.data;
    if (parsed.data.actions) {
      this.fixedActions = true;
      for (const [k, a] of parsed.data.actions.entries()) {
        const name = labelName(a);
        if (this.actionIndex.has(name)) this.fail(line, `actions[${k}]: ${JSON.stringify(name)} is listed twice`);
        this.actionIndex.set(name, this.actionNames.length);
        this.actionNames.push(name);
      }
    }
  }

  private actionOf(value: unknown, line: number, field: string): number {
    const name = labelName(value);
    const known = this.actionIndex.get(name);
    if (known !== undefined) return known;
    if (this.fixedActions) {
      this.fail(line, `${field} ${JSON.stringify(name)} is not one of the header's actions (${this.actionNames.map((a) => JSON.stringify(a)).join(', ')})`);
    }
    this.actionIndex.set(name, this.actionNames.length);
    this.actionNames.push(name);
    return this.actionNames.length - 1;
  }

  private stateOf(value: unknown, line: number): number {
    const name = labelName(value);
    const known = this.stateIndex.get(name);
    if (known !== undefined) return known;
    this.stateIndex.set(name, this.stateNames.length);
    this.stateNames.push(name);
    this.stateLines.push(line);
    return this.stateNames.length - 1;
  }

  private addStep(step: LogStep, line: number): void {
    this.sawStep = true;
    const bounds = this.header?.reward_bounds;
    if (bounds && (step.reward < bounds[0] || step.reward > bounds[1])) {
      this.fail(line, `reward ${formatNumber(step.reward)} is outside the header's reward_bounds [${formatNumber(bounds[0])}, ${formatNumber(bounds[1])}]`);
    }
    const id = labelName(step.episode);
    let episode = this.episodeIndex.get(id);
    if (episode === undefined) {
      episode = this.episodeIds.length;
      this.episodeIndex.set(id, episode);
      this.episodeIds.push(id);
      this.episodeSteps.push(0);
    }
    this.episodeSteps[episode]++;
    const state = this.stateOf(step.state, line);
    const action = this.actionOf(step.action, line, 'action');
    if (step.behaviour_probs !== undefined) this.addDistribution(step, state, action, line);
    let next = NEXT_UNKNOWN;
    if (step.next_state !== undefined) next = this.stateOf(step.next_state, line);
    if (step.end === 'terminal') next = NEXT_TERMINAL;
    this.stepEpisode.push(episode);
    this.stepT.push(step.t);
    this.stepState.push(state);
    this.stepAction.push(action);
    this.stepReward.push(step.reward);
    this.stepProb.push(step.behaviour_prob);
    this.stepNext.push(next);
    this.stepEnd.push(step.end === null ? 0 : step.end === 'terminal' ? END_TERMINAL : END_TRUNCATED);
    this.stepLine.push(line);
  }

  private addDistribution(step: LogStep, state: number, action: number, line: number): void {
    const given = step.behaviour_probs!;
    const entries: [number, number][] = [];
    if (Array.isArray(given)) {
      if (!this.fixedActions) this.fail(line, 'behaviour_probs as a list needs the header\'s "actions" (or give it as {action: probability})');
      if (given.length !== this.actionNames.length) {
        this.fail(line, `behaviour_probs has ${given.length} numbers for the header's ${this.actionNames.length} actions`);
      }
      for (let a = 0; a < given.length; a++) entries.push([a, given[a]]);
    } else {
      for (const [name, p] of Object.entries(given)) entries.push([this.actionOf(name, line, 'behaviour_probs names action'), p]);
    }
    const sum = entries.reduce((s, [, p]) => s + p, 0);
    if (Math.abs(sum - 1) > LOGGED_SUM_TOLERANCE) this.fail(line, `behaviour_probs sums to ${formatNumber(sum)}, not 1`);
    const logged = entries.find(([a]) => a === action)?.[1] ?? 0;
    if (Math.abs(logged - step.behaviour_prob) > LOGGED_SUM_TOLERANCE) {
      this.fail(line, `behaviour_prob ${formatNumber(step.behaviour_prob)} disagrees with behaviour_probs, which gives the logged action ${formatNumber(logged)}`);
    }
    let row = this.distributions.get(state);
    if (!row) {
      row = new Float64Array(0);
      this.distributions.set(state, row);
    }
    // rows grow as actions are discovered; keep the smallest positive probability seen
    let width = row.length;
    for (const [a] of entries) if (a + 1 > width) width = a + 1;
    if (width > row.length) {
      const wider = new Float64Array(width).fill(Number.POSITIVE_INFINITY);
      wider.set(row);
      row = wider;
      this.distributions.set(state, row);
    }
    for (const [a, p] of entries) if (p > 0) row[a] = Math.min(row[a], p);
  }

  finish(bytes: number, sha256: string): EpisodeLog {
    const steps = this.stepEpisode.length;
    const episodes = this.episodeIds.length;
    if (steps === 0) throw new InputError(this.where, 'the log has no steps (one JSON object a line: {"episode", "t", "state", "action", "reward", "behaviour_prob", "end"})');
    const episodeStart = new Int32Array(episodes + 1);
    for (let e = 0; e < episodes; e++) episodeStart[e + 1] = episodeStart[e] + this.episodeSteps[e];
    const slotOf = new Int32Array(steps).fill(-1); // position in the ordered arrays -> file-order step
    // Steps with t below their episode's count take slot start + t; a collision is a duplicate.
    for (let i = 0; i < steps; i++) {
      const e = this.stepEpisode.get(i);
      const t = this.stepT.get(i);
      if (t >= this.episodeSteps[e]) continue;
      const slot = episodeStart[e] + t;
      if (slotOf[slot] >= 0) {
        this.fail(this.stepLine.get(i), `duplicate step: episode ${JSON.stringify(this.episodeIds[e])} already has t = ${t} on line ${this.stepLine.get(slotOf[slot])}`);
      }
      slotOf[slot] = i;
    }
    for (let i = 0; i < steps; i++) {
      const e = this.stepEpisode.get(i);
      const t = this.stepT.get(i);
      if (t < this.episodeSteps[e]) continue;
      let missing = episodeStart[e];
      while (slotOf[missing] >= 0) missing++;
      this.fail(
        this.stepLine.get(i),
        `episode ${JSON.stringify(this.episodeIds[e])} has t = ${t} but no step t = ${missing - episodeStart[e]} (steps must be numbered 0, 1, 2, … without gaps)`,
      );
    }
    const state = new Int32Array(steps);
    const action = new Int32Array(steps);
    const reward = new Float64Array(steps);
    const behaviourProb = new Float64Array(steps);
    const nextState = new Int32Array(steps);
    const line = new Int32Array(steps);
    const episodeEnd = new Uint8Array(episodes);
    for (let e = 0; e < episodes; e++) {
      const last = episodeStart[e + 1] - 1;
      for (let k = episodeStart[e]; k <= last; k++) {
        const i = slotOf[k];
        state[k] = this.stepState.get(i);
        action[k] = this.stepAction.get(i);
        reward[k] = this.stepReward.get(i);
        behaviourProb[k] = this.stepProb.get(i);
        nextState[k] = this.stepNext.get(i);
        line[k] = this.stepLine.get(i);
        const end = this.stepEnd.get(i);
        if (k < last && end !== 0) {
          this.fail(line[k], `episode ${JSON.stringify(this.episodeIds[e])} ends at t = ${k - episodeStart[e]} ("end": ${JSON.stringify(end === END_TERMINAL ? 'terminal' : 'truncated')}) but has a step t = ${k - episodeStart[e] + 1} on line ${this.stepLine.get(slotOf[k + 1])}`);
        }
        if (k === last) {
          if (end === 0) {
            this.fail(line[k], `episode ${JSON.stringify(this.episodeIds[e])} has no end: its last step (t = ${k - episodeStart[e]}) needs "end": "terminal" or "truncated"`);
          }
          episodeEnd[e] = end;
        }
      }
      // Within an episode the next state is the following step's state unless the line says otherwise.
      for (let k = episodeStart[e]; k < last; k++) if (nextState[k] === NEXT_UNKNOWN) nextState[k] = state[k + 1];
    }
    const horizon = this.header?.horizon;
    if (horizon !== undefined) {
      for (let e = 0; e < episodes; e++) {
        const length = episodeStart[e + 1] - episodeStart[e];
        if (length > horizon) this.fail(line[episodeStart[e] + horizon], `episode ${JSON.stringify(this.episodeIds[e])} has ${length} steps, more than the header's horizon ${horizon}`);
      }
    }
    const stateCount = this.stateNames.length;
    const actionCount = this.actionNames.length;
    const behaviourDistribution = new Float64Array(stateCount * actionCount).fill(Number.NaN);
    for (const [s, row] of this.distributions) {
      for (let a = 0; a < actionCount; a++) {
        const p = a < row.length ? row[a] : 0;
        behaviourDistribution[s * actionCount + a] = Number.isFinite(p) ? p : 0;
      }
    }
    return {
      label: this.where,
      bytes,
      sha256,
      header: this.header,
      actionNames: this.actionNames,
      stateNames: this.stateNames,
      stateLine: Int32Array.from(this.stateLines),
      episodeIds: this.episodeIds,
      episodeStart,
      episodeEnd,
      state,
      action,
      reward,
      behaviourProb,
      nextState,
      line,
      behaviourDistribution,
    };
  }
}

/** The first step whose reward lies outside [low, high], as a refusal naming its line. */
export function checkRewardBounds(log: EpisodeLog, bounds: readonly [number, number], whose: string): void {
  for (let k = 0; k < log.reward.length; k++) {
    const r = log.reward[k];
    if (r < bounds[0] || r > bounds[1]) {
      throw new InputError(`${log.label}: line ${log.line[k]}`, `reward ${formatNumber(r)} is outside ${whose} reward bounds [${formatNumber(bounds[0])}, ${formatNumber(bounds[1])}]`);
    }
  }
}
