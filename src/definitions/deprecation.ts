import { isMainThread } from 'node:worker_threads';

const reported = new Set<string>();
let speaks = isMainThread;

/** Lets a worker thread that builds definitions on the main thread's behalf print the warnings. */
export function warnFromThisThread(): void {
  speaks = true;
}

/**
 * Tells the user on stderr that a name is deprecated while it keeps working. Once per
 * process and only from the main thread: worker threads rebuild the same definitions, and
 * one warning per run is enough.
 */
export function warnDeprecated(where: string, message: string): void {
  const line = `reckon: warning: ${where}: ${message}`;
  if (!speaks || reported.has(line)) return;
  reported.add(line);
  process.stderr.write(`${line}\n`);
}
