import { hostname } from 'node:os';

/** How often a running run's process records that it is alive. */
export const HEARTBEAT_SECONDS = 30;
/**
 * A run on another machine whose heartbeat is older than this is taken for dead. Generous,
 * because a process computing its figures after the last episode (a bootstrap of millions
 * of returns) does not beat meanwhile.
 */
export const STALE_SECONDS = 600;

export interface RunOwner {
  readonly pid: number | null;
  readonly host: string | null;
  /** ISO time of the owner's last heartbeat (or of the run's start). */
  readonly heartbeatAt: string | null;
}

/**
 * Whether the process that owns a running run is still alive. On this machine its process
 * id says so exactly; elsewhere only its heartbeat can.
 */
export function ownerAlive(owner: RunOwner, now: number = Date.now()): boolean {
  if (owner.pid !== null && owner.host === hostname()) {
    try {
      process.kill(owner.pid, 0);
      return true;
    } catch (e) {
      // EPERM: the process exists but belongs to another user.
      return (e as NodeJS.ErrnoException).code === 'EPERM';
    }
  }
  if (owner.heartbeatAt === null) return false;
  return now - Date.parse(owner.heartbeatAt) < STALE_SECONDS * 1000;
}
