import { InputError } from '../errors.js';

/** The stores this process has opened, newest last, so a damaged page read later can be named. */
const opened: string[] = [];

export function rememberOpenedStore(file: string): void {
  opened.push(file);
}

/**
 * SQLite's word for a damaged file (a corrupt page, a file that is not a database) turned into
 * bad input naming the store and what to do; anything else is returned as it was.
 */
export function asStoreDamage(e: unknown): unknown {
  const code = (e as { code?: string } | null)?.code ?? '';
  if (!code.startsWith('SQLITE_CORRUPT') && code !== 'SQLITE_NOTADB') return e;
  const file = opened.at(-1);
  if (file === undefined) return e;
  return new InputError(
    `store ${file}`,
    `is damaged (${(e as Error).message}); see what is affected with 'reckon runs check --store ${file}', then restore it from a copy or export what still reads`,
    { cause: e },
  );
}
