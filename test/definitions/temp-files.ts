/** Writes definition files into a fresh temporary folder for one test file. */
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll } from 'vitest';

export function tempFolder(): { write(name: string, content: unknown): string; path(name: string): string } {
  const dir = mkdtempSync(join(tmpdir(), 'reckon-definitions-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  return {
    write(name, content) {
      const file = join(dir, name);
      writeFileSync(file, typeof content === 'string' ? content : JSON.stringify(content, null, 2));
      return file;
    },
    path: (name) => join(dir, name),
  };
}

export const FIXTURES = new URL('../fixtures/definitions/', import.meta.url).pathname;

/** Textbook grids and policies in reckon's format (see test/fixtures/textbook-samples/README.md). */
export const TEXTBOOK_SAMPLES = new URL('../fixtures/textbook-samples/', import.meta.url).pathname;
