import type { Environment, Policy, Rng } from '../plugin.js';
import type { FiniteMdp, PolicyMatrix } from './finite-mdp.js';
import type { ProcessConnection } from './process-connection.js';

/** Where a definition came from: `label` prefixes every error message; `baseDir` resolves relative paths. */
export interface DefinitionSource {
  readonly label: string;
  readonly baseDir: string;
  /** The file it was read from (absolute), when it came from a file. */
  readonly file?: string;
}

/** An environment ready to run: either compiled to flat arrays, or a user's code. */
export type BuiltEnvironment = FiniteEnvironment | ModuleEnvironment;

export interface FiniteEnvironment {
  readonly kind: 'finite';
  readonly mdp: FiniteMdp;
}

export interface ModuleEnvironment {
  readonly kind: 'module';
  readonly env: Environment;
  readonly actionNames: readonly string[];
  readonly discount: number;
  /** Resolved horizon (given by the module, or derived from its reward range and the tolerance). */
  readonly horizon: number;
  readonly horizonDerived: boolean;
  readonly rewardRange: readonly [number, number] | null;
  /** Set when the environment is a program of its own (`"kind": "process"`). */
  readonly process?: ProcessLink;
}

/** A process environment's program: how it was started, what it serves, and (on a worker) the live connection. */
export interface ProcessLink {
  /** The program's name in messages and as the prefix of its stderr lines. */
  readonly label: string;
  readonly policies: readonly string[];
  /** Kept open only on the threads that run episodes (keepProcessConnections). */
  readonly connection: ProcessConnection | null;
}

/**
 * A policy ready to run. On a finite environment every built-in kind compiles to a
 * {@link PolicyMatrix}; code policies and any policy on a module environment act through
 * {@link ActingPolicy}.
 */
export type BuiltPolicy = MatrixPolicy | CodePolicy;

export interface MatrixPolicy {
  readonly kind: 'matrix';
  readonly matrix: PolicyMatrix;
}

export interface CodePolicy {
  readonly kind: 'code';
  readonly acting: ActingPolicy;
  /** The policy as a matrix when it can be tabulated on a finite env (module policy with `probabilities`). */
  readonly matrix: PolicyMatrix | null;
  /**
   * On a module environment, the action distribution at one of its states (by action index),
   * when the policy can give it: what a recorded log's behaviour probabilities are. Absent for
   * a module policy without `probabilities`.
   */
  readonly probabilitiesAt?: (state: unknown) => Float64Array;
  /** Set for a policy that acts inside a process environment's program (`"kind": "process"`). */
  readonly inProcess?: { readonly name: string; readonly options: Record<string, unknown> };
}

/** Chooses an action index for a state; `stateName` is the env's name for it (for table lookups). */
export interface ActingPolicy {
  act(state: unknown, rng: Rng): number;
  /**
   * For a module policy on a module environment: the plug-in itself, and what `act` does with
   * its answer (the action index, or the error `act` throws). The code environment's rollout
   * loop calls the plug-in directly, one call fewer a step, which leaves the JIT the room to
   * inline both plug-ins' hot paths; `act(s, rng)` is `index(policy.act(s, rng))`.
   */
  readonly direct?: { readonly policy: Policy; index(answer: unknown): number };
}
