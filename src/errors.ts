/**
 * The one registry of failures. A user's bad input (a file, an option, an HTTP body)
 * is an {@link InputError}: one line that names the place, exit code 2, HTTP 400.
 * Anything else that escapes is our bug: exit code 1.
 */

/** Bad input from the user. `where` names the file or option; the message says what is wrong. */
export class InputError extends Error {
  readonly exitCode: number = 2;
  readonly httpStatus: number = 400;
  constructor(readonly where: string, readonly detail: string, options?: { cause?: unknown }) {
    super(where ? `${where}: ${detail}` : detail, options);
    this.name = 'InputError';
  }
}

/** A run asked for something that does not exist (an unknown run id, a missing state). */
export class NotFoundError extends InputError {
  override readonly httpStatus: number = 404;
  constructor(where: string, detail: string) {
    super(where, detail);
    this.name = 'NotFoundError';
  }
}

/**
 * A plug-in (module environment or policy) threw, hung, or returned something it must not.
 * Carries what is needed to replay the failure: the episode index and step, so `--seed S`
 * reproduces it.
 */
export class PluginError extends Error {
  readonly exitCode = 1;
  constructor(
    readonly plugin: string,
    readonly episode: number,
    readonly step: number,
    cause: unknown,
    /** What the plug-in did: `threw`, `hung`, `returned`. */
    what = 'threw',
  ) {
    const why = cause instanceof Error ? cause.message : String(cause);
    super(`${plugin} ${what} at episode ${episode}, step ${step}: ${why}`, { cause });
    this.name = 'PluginError';
  }
}

export function isInputError(e: unknown): e is InputError {
  return e instanceof InputError;
}

/**
 * A run stopped by a signal or a stop request before it had the two episodes every figure
 * needs. Not a failure: the run is kept as interrupted (`runId`, once it exists), so that
 * `reckon runs resume` can continue it; the command exits as for any other interruption.
 */
export class StoppedEarly extends Error {
  /** The stored run, when one had been created before the stop. */
  runId: string | null = null;
  constructor(
    /** Episodes the run has (a resumed run's earlier ones included). */
    readonly episodes: number,
    readonly requested: number,
    /** Whether the environment and policy were still being created (their code had not returned). */
    readonly creating = false,
  ) {
    super(creating ? 'stopped while the environment and policy were being created' : `stopped after ${episodes} episode(s), too few for any figure`);
    this.name = 'StoppedEarly';
  }
}
