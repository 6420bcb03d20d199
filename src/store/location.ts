import { homedir } from 'node:os';
import path from 'node:path';

/**
 * Where runs are kept unless `--store PATH` says otherwise: `$RECKON_STORE` if set, else the
 * per-user data folder of the XDG convention, `$XDG_DATA_HOME/reckon/runs.sqlite`
 * (by default `~/.local/share/reckon/runs.sqlite`), so runs from any folder land in one place.
 */
export function defaultStorePath(env: NodeJS.ProcessEnv = process.env): string {
  if (env.RECKON_STORE) return env.RECKON_STORE;
  const dataHome = env.XDG_DATA_HOME || path.join(homedir(), '.local', 'share');
  return path.join(dataHome, 'reckon', 'runs.sqlite');
}
