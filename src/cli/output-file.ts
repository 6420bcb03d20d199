import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { InputError } from '../errors.js';

/**
 * Writes a file the user named (`--out`, `--into`): a folder that does not exist, a path
 * that is a folder, or one without write permission is bad input, named as given.
 */
export function writeOutputFile(option: string, file: string, content: string | Uint8Array): void {
  try {
    writeFileSync(file, content);
  } catch (e) {
    throw new InputError(option, `cannot write ${file}: ${describeWriteFailure(e, file)}`, { cause: e });
  }
}

function describeWriteFailure(e: unknown, file: string): string {
  switch ((e as NodeJS.ErrnoException).code) {
    case 'ENOENT':
      return `the folder ${path.dirname(file)} does not exist (create it first)`;
    case 'EISDIR':
      return 'it is a folder; give a file name';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'ENOTDIR':
      return 'a part of the path is a file, not a folder';
    default:
      return (e as Error).message;
  }
}
