import { InputError } from '../errors.js';

/**
 * Over HTTP a definition must be data only: a `module` or `process` kind would make the server
 * import or start code from a request, and a `"path"` would let a request name files on the server's disk
 * (an epsilon policy's `base.path`). Both are refused with the place they occur.
 */
export function refuseCodeAndPaths(json: unknown, field: 'env' | 'policy' | 'behaviour', trail: string[] = []): void {
  if (Array.isArray(json)) {
    json.forEach((item, i) => refuseCodeAndPaths(item, field, [...trail, `[${i}]`]));
    return;
  }
  if (json === null || typeof json !== 'object') return;
  const record = json as Record<string, unknown>;
  const at = trail.length ? ` (at ${trail.join('').replace(/^\./, '')})` : '';
  if (record.kind === 'module' || record.kind === 'process') {
    throw new InputError(field, `"kind": "${record.kind}" runs code, so the server refuses it${at}; evaluate it with 'reckon estimate' on the command line`);
  }
  if ('path' in record) {
    throw new InputError(field, `"path" names a file, and the server accepts no file paths${at}; give the definition inline instead (e.g. "base": { "kind": ... })`);
  }
  for (const [key, value] of Object.entries(record)) refuseCodeAndPaths(value, field, [...trail, `.${key}`]);
}
