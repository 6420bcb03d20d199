import { createHash, timingSafeEqual } from 'node:crypto';
import type { FastifyReply, FastifyRequest } from 'fastify';

const LOOPBACK_NAMES = new Set(['localhost', '127.0.0.1', '[::1]', '::1']);

/** True for addresses that only this machine can reach. */
export function isLoopbackHost(host: string): boolean {
  return LOOPBACK_NAMES.has(host) || /^127(\.\d{1,3}){3}$/.test(host);
}

function digest(text: string): Buffer {
  return createHash('sha256').update(text).digest();
}

/**
 * Every request's gate. With a token, a request must carry it (`Authorization: Bearer T`, or
 * `?token=T` for the page's first load and its event streams, which cannot set headers).
 * Without one the server is loopback-only, and a request whose Host is not a loopback name is
 * refused too: a web page elsewhere could otherwise reach it by pointing its own domain name
 * at 127.0.0.1 (DNS rebinding).
 */
export function requestGate(token: string | null) {
  const expected = token === null ? null : digest(token);
  return async (request: FastifyRequest, reply: FastifyReply) => {
    if (expected === null) {
      const host = (request.headers.host ?? '').replace(/:\d+$/, '');
      if (!isLoopbackHost(host)) {
        return reply.code(403).send({ error: `Host "${host}" is not a loopback name; this server answers only http://127.0.0.1 or http://localhost` });
      }
      return;
    }
    const header = request.headers.authorization ?? '';
    const fromQuery = (request.query as Record<string, unknown> | undefined)?.token;
    const given = header.startsWith('Bearer ') ? header.slice(7) : typeof fromQuery === 'string' ? fromQuery : null;
    if (given === null || !timingSafeEqual(digest(given), expected)) {
      return reply.code(401).send({ error: 'this server needs its token: send "Authorization: Bearer TOKEN" (or open the page as /?token=TOKEN)' });
    }
  };
}
