import { describe, expect, test } from 'vitest';
import { InputError } from '../../src/errors.js';
import { findJsonSyntaxError } from '../../src/definitions/json-syntax.js';
import { readDefinitionFile } from '../../src/definitions/read-file.js';
import { tempFolder } from './temp-files.js';

const files = tempFolder();

function readError(path: string): InputError {
  try {
    readDefinitionFile(path);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).exitCode).toBe(2);
    return e as InputError;
  }
  throw new Error('expected an InputError');
}

describe('readDefinitionFile', () => {
  test('labels the source with the path as given and its folder', () => {
    const path = files.write('ok.json', { kind: 'uniform' });
    const { json, source } = readDefinitionFile(path);
    expect(json).toEqual({ kind: 'uniform' });
    expect(source.label).toBe(path);
    expect(source.baseDir).toBe(files.path(''));
  });

  test('missing file', () => {
    expect(readError(files.path('grid.json')).message).toContain('grid.json: no such file');
  });

  test('empty file, including whitespace only', () => {
    expect(readError(files.write('empty.json', '')).message).toContain('empty.json: the file is empty');
    expect(readError(files.write('blank.json', ' \n\t\n')).message).toContain('blank.json: the file is empty');
  });

  test('a byte-order mark is accepted', () => {
    expect(readDefinitionFile(files.write('bom.json', '\ufeff{"kind":"uniform"}')).json).toEqual({ kind: 'uniform' });
  });

  // Positions counted by hand on the texts below (1-based line and column).
  test.each([
    ['missing comma', '{\n  "kind": "gridworld"\n  "discount": 1\n}', 'line 3, column 3', "expected ',' or '}'"],
    ['trailing comma', '{\n  "kind": "uniform",\n}', 'line 3, column 1', 'trailing comma'],
    ['single quotes', "{\n  'kind': 1\n}", 'line 2, column 3', 'double-quoted property name'],
    ['unclosed object', '{\n  "kind": "uniform"', 'line 2, column 20', "found the end of the file"],
    ['bare word', '{"discount": .9}', 'line 1, column 14', 'expected a value'],
    ['text after the value', '{"kind": "uniform"}\n}', 'line 2, column 1', 'after the end of the JSON value'],
  ])('JSON syntax error with line and column: %s', (_name, text, where, why) => {
    const message = readError(files.write('grid.json', text)).message;
    expect(message).toContain(`grid.json: invalid JSON at ${where}: `);
    expect(message).toContain(why);
  });
});

describe('JSON scanner agrees with V8 JSON.parse on what is valid', () => {
  // Outside reference: the engine's own JSON.parse (ECMA-404 / RFC 8259). Mutations of valid
  // definitions (a character deleted, duplicated or replaced) must be judged the same way.
  const seeds = [
    '{"kind":"gridworld","discount":0.9,"layout":["..+",".#-"],"cells":{".":{"slip":0.2},"#":{"wall":true}}}',
    '{"kind":"table","states":{"1,1":{"up":0.5,"left":0.5}},"default":"uniform","n":[1e-3,-0.5,true,null,"a\\"b\\u00e9"]}',
  ];
  const alphabet = '{}[]:,"\\ .-+eE0123456789tfnulx\n';
  let state = 12345;
  const next = () => (state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 4294967296; // fixed-seed LCG
  test('2000 random mutations', () => {
    let disagreements = 0;
    for (let k = 0; k < 2000; k++) {
      const seed = seeds[k % seeds.length];
      const i = Math.floor(next() * seed.length);
      const ch = alphabet[Math.floor(next() * alphabet.length)];
      const op = k % 3;
      const text = op === 0 ? seed.slice(0, i) + seed.slice(i + 1) : op === 1 ? seed.slice(0, i) + ch + seed.slice(i) : seed.slice(0, i) + ch + seed.slice(i + 1);
      let valid = true;
      try {
        JSON.parse(text);
      } catch {
        valid = false;
      }
      if ((findJsonSyntaxError(text) === null) !== valid) disagreements++;
    }
    expect(disagreements).toBe(0);
  });
});
