import { z } from 'zod';
import { InputError } from '../../errors.js';
import { isLoopbackHost } from '../../server/auth.js';
import { defaultStorePath } from '../../store/location.js';
import { parseCommandArgs } from '../args.js';
import { parseOption } from '../../options/parse-option.js';
import { version } from '../version.js';

export const HELP = `reckon serve: review stored runs in a web page, and start evaluations over HTTP

Usage: reckon serve [--store PATH] [--port 7070] [--host 127.0.0.1] [options]

Options:
  --store PATH          the run store to show and add to (default: $RECKON_STORE, else
                        ~/.local/share/reckon/runs.sqlite); the command line sees the same runs
  --port N              port to listen on (default 7070; 0 picks a free one)
  --host H              address to listen on (default 127.0.0.1, this machine only); any
                        other address needs --token
  --token T             require T on every request (Authorization: Bearer T, or ?token=T in
                        the page's address); RECKON_TOKEN sets it without showing it in ps
  --concurrency N       evaluations running at once (default 1)
  --queue N             evaluations waiting beyond those; more are refused with 429 (default 8)
  --workers K           worker threads per evaluation (default: all cores)
  --max-episodes N      most episodes one request may ask for (default 10000000)
  -h, --help            this help

The page lists the runs with live progress, draws each run's convergence, return and length
histograms and (for gridworlds) the exact value map, and has a form to start an evaluation.
Definitions that run code ("kind": "module") and file paths are refused over HTTP.

Examples:
  reckon serve
  reckon serve --store runs.sqlite --port 8080
  RECKON_TOKEN=$(openssl rand -hex 16) reckon serve --host 0.0.0.0
`;

const OPTIONS = {
  store: { type: 'string' },
  port: { type: 'string' },
  host: { type: 'string' },
  token: { type: 'string' },
  concurrency: { type: 'string' },
  queue: { type: 'string' },
  workers: { type: 'string' },
  'max-episodes': { type: 'string' },
} as const;

function whole(name: string, text: string | undefined, min: number, max: number, fallback: number): number {
  if (text === undefined) return fallback;
  const parsed = z.coerce.number().int().min(min).max(max).safeParse(text.trim() === '' ? 'x' : text);
  if (!parsed.success) throw new InputError(`--${name}`, `must be a whole number from ${min} to ${max} (got "${text}")`);
  return parsed.data;
}

export async function run(args: string[]): Promise<number> {
  const { values } = parseCommandArgs('serve', args, OPTIONS);
  if (values.help) {
    process.stdout.write(HELP);
    return 0;
  }
  const host = values.host ?? '127.0.0.1';
  const token = values.token ?? process.env.RECKON_TOKEN ?? null;
  if (token !== null && token.length < 8) throw new InputError('--token', 'must be at least 8 characters (e.g. openssl rand -hex 16)');
  if (!isLoopbackHost(host) && token === null) {
    throw new InputError('--host', `"${host}" lets other machines reach the server; give --token T (or RECKON_TOKEN) so that only holders of the token can, or keep the default 127.0.0.1`);
  }
  const port = whole('port', values.port, 0, 65535, 7070);
  const storePath = values.store ?? defaultStorePath();
  const { buildApp } = await import('../../server/app.js');
  const app = await buildApp({
    storePath,
    token,
    concurrency: whole('concurrency', values.concurrency, 1, 64, 1),
    queueSize: whole('queue', values.queue, 0, 10000, 8),
    workers: values.workers === undefined ? undefined : parseOption('workers', 'workers', values.workers),
    maxEpisodes: values['max-episodes'] === undefined ? undefined : parseOption('max-episodes', 'episodes', values['max-episodes']),
    toolVersion: version(),
  });
  let address: string;
  try {
    address = await app.listen({ port, host });
  } catch (e) {
    await app.close();
    const code = (e as { code?: string }).code;
    if (code === 'EADDRINUSE') throw new InputError('--port', `${port} is in use; choose another (--port 0 picks a free one)`);
    if (code === 'EADDRNOTAVAIL') throw new InputError('--host', `"${host}" is not an address of this machine`);
    throw e;
  }
  process.stdout.write(`reckon serve: runs from ${storePath}\n  open ${address}/${token ? '?token=…' : ''}   (Ctrl-C stops; running evaluations are left resumable)\n`);
  await new Promise<void>((resolve) => {
    const stop = () => {
      process.off('SIGINT', stop);
      process.off('SIGTERM', stop);
      resolve();
    };
    process.on('SIGINT', stop);
    process.on('SIGTERM', stop);
  });
  process.stdout.write('reckon serve: stopping\n');
  await app.close();
  return 0;
}
