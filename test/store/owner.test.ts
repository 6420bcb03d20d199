import { describe, expect, it } from 'vitest';
import { hostname } from 'node:os';
import { spawnSync } from 'node:child_process';
import { ownerAlive, STALE_SECONDS } from '../../src/store/owner.js';

/**
 * Whether a running run's process is alive: on this machine by its process id, elsewhere by
 * its heartbeat. The dead process is a real one that has exited (its id is not reused this
 * quickly in practice: Linux hands out ids in increasing order, common practice).
 */
describe('owner liveness', () => {
  it('this machine: a live process id is alive, an exited one is not', () => {
    expect(ownerAlive({ pid: process.pid, host: hostname(), heartbeatAt: null })).toBe(true);
    const exited = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    const pid = Number(exited.stdout);
    expect(ownerAlive({ pid, host: hostname(), heartbeatAt: new Date().toISOString() })).toBe(false);
  });

  it('another machine: alive while its heartbeat is recent, dead once it is stale', () => {
    const now = Date.parse('2026-06-01T12:00:00Z');
    const at = (secondsAgo: number) => new Date(now - secondsAgo * 1000).toISOString();
    const elsewhere = `not-${hostname()}`;
    expect(ownerAlive({ pid: 1, host: elsewhere, heartbeatAt: at(5) }, now)).toBe(true);
    expect(ownerAlive({ pid: 1, host: elsewhere, heartbeatAt: at(STALE_SECONDS + 1) }, now)).toBe(false);
    expect(ownerAlive({ pid: 1, host: elsewhere, heartbeatAt: null }, now)).toBe(false);
  });
});
