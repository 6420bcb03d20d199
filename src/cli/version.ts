import { readFileSync } from 'node:fs';

/** The tool's version, from package.json (one source of truth). */
export function version(): string {
  const url = new URL('../../package.json', import.meta.url);
  return (JSON.parse(readFileSync(url, 'utf8')) as { version: string }).version;
}
