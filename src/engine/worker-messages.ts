/** Messages between the pool and its worker threads. */
export type ToWorker = { type: 'run'; first: number; count: number } | { type: 'stop' };

export type FromWorker =
  | { type: 'ready' }
  | { type: 'block'; first: number; count: number; returns: Float64Array; lengths: Uint32Array; finals: Int32Array; steps: number }
  | { type: 'error'; name: string; message: string; where?: string; detail?: string };
