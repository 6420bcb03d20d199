import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { definitionFiles, firstChangedFile } from '../../src/store/definition-files.js';
import { definitionHash } from '../../src/store/definition-hash.js';
import { tempFiles } from '../cli/run-cli.js';

describe("a process environment's script", () => {
  it('is one of the files a run was defined by, and part of its hash, so a resume notices a change', () => {
    const env = { kind: 'process', command: ['python3', './aisle.py', '--quiet'], options: {} };
    const dir = tempFiles({ 'aisle.py': 'print("v1")\n', 'aisle.json': env });
    const file = path.join(dir, 'aisle.json');
    const files = definitionFiles('environment', file, env, dir);
    expect(files.map((f) => path.basename(f.path))).toEqual(['aisle.json', 'aisle.py']);
    const before = definitionHash(env, dir);
    writeFileSync(path.join(dir, 'aisle.py'), 'print("v2")\n');
    expect(definitionHash(env, dir)).not.toBe(before);
    expect(path.basename(firstChangedFile(files)!.file.path)).toBe('aisle.py');
  });
});
