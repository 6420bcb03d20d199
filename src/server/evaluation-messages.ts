import type { RolloutSpec } from '../engine/spec.js';
import type { CompareRequest } from '../evaluate/compare.js';
import type { StoredOptions } from '../evaluate/stored-estimate.js';
import type { JobProgress } from './run-queue.js';
import type { Annotations } from '../options/annotation-options.js';

/** What to run: one policy's estimate, or a comparison (plain data: no callbacks cross threads). */
export type EvaluationTask =
  | { readonly kind: 'estimate'; readonly spec: RolloutSpec; readonly options: StoredOptions; readonly annotations?: Annotations }
  | { readonly kind: 'comparison'; readonly request: CompareRequest; readonly annotations?: Annotations };

/** What an evaluation thread is started with; it then runs one task after another (ToEvaluationWorker). */
export interface EvaluationWorkerData {
  readonly storePath: string;
  readonly toolVersion: string;
}

export type ToEvaluationWorker =
  | {
      readonly type: 'task';
      readonly task: EvaluationTask;
      /** One Int32: 0 wait, 1 go, 2 stop. The worker waits on it once its run exists in the store. */
      readonly gate: SharedArrayBuffer;
    }
  | { readonly type: 'close' };

export const GATE_WAIT = 0;
export const GATE_GO = 1;
export const GATE_STOP = 2;

export type FromEvaluationWorker =
  | { readonly type: 'created'; readonly runId: string }
  | { readonly type: 'progress'; readonly progress: JobProgress }
  | {
      readonly type: 'end';
      readonly status: 'done' | 'interrupted' | 'failed';
      readonly error: string | null;
      /** Set when the request itself was bad (before any run existed): the server answers 400. */
      readonly input: { readonly where: string; readonly detail: string } | null;
    };
