import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The package's root folder, found from this file: it sits at `src/server/` in a clone and at
 * `dist/server/` in a build, two levels down either way, so the shipped `web/` and `envs/`
 * folders are found the same way from source (tests) and from the build (the `reckon` bin).
 */
export const PACKAGE_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

/** The browser build of a charting package, served from node_modules (no CDN). */
export function vendorFile(packageName: 'vega' | 'vega-lite', file: string): string {
  const entry = createRequire(import.meta.url).resolve(packageName);
  return path.join(path.dirname(entry), file);
}
