import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { FastifyInstance } from 'fastify';
import { PACKAGE_ROOT, vendorFile } from '../package-root.js';

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
};

/**
 * Vega compiles chart expressions with `new Function`, hence 'unsafe-eval'; everything else
 * is this server's own: no script, style or connection elsewhere is allowed.
 */
const SECURITY_HEADERS = {
  'content-security-policy':
    "default-src 'self'; script-src 'self' 'unsafe-eval'; style-src 'self' 'unsafe-inline'; img-src 'self' data:; connect-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'self'",
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'no-referrer',
};

/**
 * The page: a fixed list of files from the shipped `web/` folder and the charting library's
 * browser builds from node_modules, read once at start. No path from a request ever reaches
 * the file system, and nothing is fetched from another site.
 */
export function pageRoutes(app: FastifyInstance, webRoot = path.join(PACKAGE_ROOT, 'web')): void {
  const files: Record<string, string> = {
    '/': path.join(webRoot, 'index.html'),
    '/app.js': path.join(webRoot, 'app.js'),
    '/plots.js': path.join(webRoot, 'plots.js'),
    '/style.css': path.join(webRoot, 'style.css'),
    '/vendor/vega.min.js': vendorFile('vega', 'vega.min.js'),
    '/vendor/vega-lite.min.js': vendorFile('vega-lite', 'vega-lite.min.js'),
  };
  for (const [url, file] of Object.entries(files)) {
    const body = readFileSync(file);
    const type = TYPES[path.extname(file)] ?? 'application/octet-stream';
    app.get(url, async (_request, reply) => reply.headers({ ...SECURITY_HEADERS, 'content-type': type, 'cache-control': 'no-cache' }).send(body));
  }
}
