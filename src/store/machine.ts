import { availableParallelism, cpus, hostname, platform, arch, totalmem } from 'node:os';

/** Facts about the machine a run ran on, kept with the run for reading its throughput later. */
export function machineFacts(): Record<string, unknown> {
  return {
    host: hostname(),
    cores: availableParallelism(),
    cpu: cpus()[0]?.model ?? 'unknown',
    memory_gib: Math.round((totalmem() / 2 ** 30) * 10) / 10,
    node: process.version,
    platform: `${platform()}-${arch()}`,
  };
}
