import { execFileSync } from 'node:child_process';
import { pathToFileURL } from 'node:url';
import { describe, expect, test } from 'vitest';
import { explainImportFailure } from '../../src/definitions/module-loader.js';
import { tempFolder } from './temp-files.js';

const files = tempFolder();

describe('TypeScript modules on Node 20', () => {
  test('the error Node itself raises for a TypeScript file it cannot run (.tsx) becomes advice', () => {
    // Ask a plain Node process (no test-runner transforms) what importing a .ts file does.
    const path = files.write('tide-env.ts', 'export default () => ({ actions: ["wait"] as string[] });');
    const script = `import(${JSON.stringify(pathToFileURL(path).href)}).then(() => console.log(JSON.stringify({ ok: true })), (e) => console.log(JSON.stringify({ code: e.code, message: e.message })))`;
    const outcome = JSON.parse(execFileSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8' }));
    if (outcome.ok) return; // a Node that strips types imports it: nothing to explain
    const error = Object.assign(new Error(outcome.message), { code: outcome.code });
    expect(explainImportFailure('./tide-env.tsx', error)).toContain(
      'cannot import TypeScript module "./tide-env.tsx": reckon runs .ts and .mts modules',
    );
  });

  test('other failures keep the original reason', () => {
    expect(explainImportFailure('./env.js', new SyntaxError("Unexpected token '}'"))).toBe(
      `could not load module "./env.js": Unexpected token '}'`,
    );
  });
});
