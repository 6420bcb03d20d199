import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import path from 'node:path';

/**
 * The README's job-array recipe on a real Slurm: scripts/slurm/local-cluster-check.sh starts
 * a one-node cluster (needs root and Debian's slurm-wlm and munge, which .ci/run installs),
 * runs `--shard auto/4` as `sbatch --array=0-3`, merges and compares with the unsharded run
 * bit for bit, then lets a time limit interrupt a second array, resumes and compares again.
 */
const hasSlurm = spawnSync('sh', ['-c', 'command -v sbatch && command -v slurmctld && command -v munged'], { encoding: 'utf8' }).status === 0;
const isRoot = process.getuid?.() === 0;
const script = path.resolve(__dirname, '../../scripts/slurm/local-cluster-check.sh');

describe.skipIf(!hasSlurm || !isRoot)('a real Slurm cluster (one node, started by the test)', () => {
  it('job-array shards merge to the unsharded run, also after a time limit interrupts them', () => {
    const out = spawnSync('bash', [script], { encoding: 'utf8', timeout: 420_000 });
    if (out.status !== 0) throw new Error(`exit ${out.status}\n${out.stdout}\n${out.stderr}`);
    expect(out.stdout).toContain('interrupted after');
    expect(out.stdout).toContain('all agree');
  }, 450_000);
});
