import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { ENVS, reckon, tempFiles } from './run-cli.js';
import { episodeSeed } from '../../src/engine/process-seeds.js';
import { STREAM } from '../../src/engine/streams.js';

/**
 * What a process environment's program can get wrong, through the command line: a failure
 * while running (an exception, a bad value, a hang, a death) fails the run naming the episode
 * and step (exit 1; the run is stored as failed with the reason, and the same seed replays
 * it); a program that cannot start or does not speak the protocol is bad input (exit 2).
 */

/** A shelf that fails as its options say, in the episodes whose ENV seed is 3 modulo `every` (10), at its third step. */
const SHELF = `
import os, sys, time
from reckon_bridge import serve

class Shelf:
    actions = ["wait", "pick"]
    discount = 0.9
    horizon = 20
    reward_bounds = (0, 1)

    def __init__(self, options):
        self.fail = options.get("fail")
        self.every = options.get("every", 10)
        self.seed = 0
        self.t = 0
        if self.fail == "chatty":
            print("shelf ready", file=sys.stderr)

    def reset(self, seed):
        self.seed, self.t = seed, 0
        if self.fail == "reset" and seed % 10 == 3:
            raise ValueError("the scanner is offline")
        return 0, {}

    def state_name(self, observation):
        if self.fail == "hang_name" and self.seed % self.every == 3 and self.t == 3:
            time.sleep(60)
        return str(observation)

    def step(self, action):
        self.t += 1
        jam = self.seed % self.every == 3 and self.t == 3
        if jam and self.fail == "nan":
            return self.t, float("nan"), False, False, {}
        if jam and self.fail == "hang":
            time.sleep(60)
        if jam and self.fail == "die":
            os._exit(7)
        if jam and self.fail == "chatty":
            print("picked one from the top shelf")
        return self.t, 0.5 * action, self.t >= 10, False, {}

class Wild:
    def act(self, observation, rng):
        return 7 if observation == 2 else 1

class Steady:
    def act(self, observation, rng):
        return "pick"

serve(Shelf, policies={"wild": lambda options, actions: Wild(), "steady": lambda options, actions: Steady()})
`;

const shelf = (fail: string | null, every = 10) => ({ kind: 'process', command: ['python3', './shelf.py'], options: fail ? { fail, every } : {} });
const dir = tempFiles({
  'shelf.py': SHELF,
  'no_serve.py': 'class Shelf:\n    actions = ["wait"]\n',
  'chatter.py': 'print("hello from the import")\nfrom reckon_bridge import serve\nserve(lambda options: None)\n',
  'old_protocol.py': 'import sys, json\nsys.stdin.readline()\nprint(json.dumps({"reckon": 1, "ok": "open"}), flush=True)\nsys.stdin.readline()\n',
  'reset.json': shelf('reset'),
  'nan.json': shelf('nan'),
  'hang.json': shelf('hang'),
  'hang-name.json': shelf('hang_name'),
  'die.json': shelf('die', 97),
  'chatty.json': shelf('chatty'),
  'fine.json': shelf(null),
  'no-interpreter.json': { kind: 'process', command: ['python3-nowhere', './shelf.py'] },
  'no-script.json': { kind: 'process', command: ['python3', './nowhere.py'] },
  'no-serve.json': { kind: 'process', command: ['python3', './no_serve.py'] },
  'chatter.json': { kind: 'process', command: ['python3', './chatter.py'] },
  'old-protocol.json': { kind: 'process', command: ['python3', './old_protocol.py'] },
  'wild.json': { kind: 'process', name: 'wild' },
  'steady.json': { kind: 'process', name: 'steady' },
  'unknown.json': { kind: 'process', name: 'cautious' },
  'uniform.json': { kind: 'uniform' },
});
const inDir = (name: string) => path.join(dir, name);

function json(result: { code: number | null; stdout: string; stderr: string }) {
  if (result.code !== 0) throw new Error(`exit ${result.code}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

/** The episodes, in order, whose environment seed is 3 modulo `every`: where the shelf fails. */
function jams(seed: number, episodes: number, every = 10): number[] {
  const found: number[] = [];
  for (let e = 0; e < episodes; e++) if (BigInt(episodeSeed(seed, STREAM.ENV, e)) % BigInt(every) === 3n) found.push(e);
  return found;
}

describe('a program that fails', () => {
  const run = (env: string, policy: string, extra: string[] = []) =>
    reckon(['estimate', '--env', inDir(env), '--policy', inDir(policy), '--episodes', '200', '--seed', '5', '--workers', '1', ...extra]);
  const firstJam = jams(5, 200)[0];

  it('an exception in reset fails the run naming the episode, with the traceback; the run is stored as failed with the reason', () => {
    expect(firstJam).toBeLessThan(64); // all of the first side-by-side batch reset in episode order
    const store = inDir('failed.sqlite');
    const out = run('reset.json', 'uniform.json', ['--store', store]);
    expect(out.code).toBe(1);
    expect(out.stderr).toContain(`the environment (reset) threw at episode ${firstJam}, step 0: ValueError: the scanner is offline`);
    expect(out.stderr).toContain('in reset');
    const [stored] = json(reckon(['runs', 'list', '--store', store, '--json']));
    expect(stored.status).toBe('failed');
    expect(json(reckon(['runs', 'show', stored.id, '--store', store, '--json'])).error).toContain('the scanner is offline');
  });

  it('a non-finite reward fails the run naming the episode and step', () => {
    const out = run('nan.json', 'uniform.json', ['--no-store']);
    expect(out.code).toBe(1);
    expect(out.stderr).toContain(`the environment (step) returned a bad reward at episode ${firstJam}, step 2: nan is not a finite number`);
  });

  it('an action out of range, chosen by a policy of the program, fails the run naming the episode and step', () => {
    const out = run('fine.json', 'wild.json', ['--no-store']);
    expect(out.code).toBe(1);
    expect(out.stderr).toContain('the policy chose a bad action at episode 0, step 2: 7 is not one of 0..1 (nor a name among wait, pick)');
  });

  it('a hung step fails the run after --step-timeout on both paths, naming the episode and step and where it hung', () => {
    for (const policy of ['uniform.json', 'steady.json']) {
      const started = Date.now();
      const out = run('hang.json', policy, ['--no-store', '--step-timeout', '1']);
      expect(out.code).toBe(1);
      expect(out.stderr).toContain(`hung at episode ${firstJam}, step 2: no answer within 1 s (raise --step-timeout if it is only slow)`);
      expect(out.stderr).toContain('time.sleep(60)');
      expect(Date.now() - started).toBeLessThan(30_000);
    }
  }, 60_000);

  it('a hung state_name on the step path is named as such', () => {
    const out = run('hang-name.json', 'uniform.json', ['--no-store', '--step-timeout', '1']);
    expect(out.code).toBe(1);
    expect(out.stderr).toContain(`the environment (state_name) hung at episode ${firstJam}, step 2: no answer within 1 s`);
    expect(out.stderr).toContain('in state_name');
  }, 30_000);

  it('a program that dies mid-block fails the run; the episodes finished before it are kept', () => {
    const store = inDir('died.sqlite');
    const dies = jams(5, 200, 97)[0];
    expect(dies).toBeGreaterThan(32); // beyond the first block, which is then committed
    const out = run('die.json', 'steady.json', ['--store', store]);
    expect(out.code).toBe(1);
    // It cannot say where it was: the message names the block it was running, which holds that episode.
    const [, from, to] = /the environment \(shelf\.py\) died while running episodes (\d+) to (\d+): the program exited with code 7/.exec(out.stderr) ?? [];
    expect(Number(from)).toBeLessThanOrEqual(dies);
    expect(Number(to)).toBeGreaterThanOrEqual(dies);
    const [stored] = json(reckon(['runs', 'list', '--store', store, '--json']));
    expect(stored.status).toBe('failed');
    expect(stored.episodes).toBeGreaterThan(0);
    expect(stored.episodes).toBeLessThanOrEqual(dies);
  });

  it('its stderr is shown prefixed with its name, and a print while serving goes there too', () => {
    const out = run('chatty.json', 'uniform.json', ['--no-store']);
    expect(out.code).toBe(0);
    expect(out.stderr).toContain('[shelf.py] shelf ready');
    expect(out.stderr).toContain('[shelf.py] picked one from the top shelf');
  });
});

describe('a process definition that cannot start is bad input (exit 2)', () => {
  const check = (env: string, policy?: string) => reckon(['estimate', '--env', inDir(env), '--policy', inDir(policy ?? 'uniform.json'), '--episodes', '10', '--no-store']);
  const cases: [string, string | undefined, string][] = [
    ['no-interpreter.json', undefined, 'no-interpreter.json: environment from shelf.py: command "python3-nowhere" not found (is it installed and on PATH?)'],
    ['no-script.json', undefined, `no-script.json: command[1]: "./nowhere.py" not found (looked for ${inDir('nowhere.py')})`],
    ['no-serve.json', undefined, 'no-serve.json: environment from no_serve.py: the program ended without answering reckon: does the script end with serve(make_env) (python/reckon_bridge.py)?'],
    ['old-protocol.json', undefined, 'old-protocol.json: environment from old_protocol.py speaks protocol version 1, and this reckon speaks 2'],
    ['chatter.json', undefined, 'chatter.json: environment from chatter.py: the program printed "hello from the import" on its standard output, which is not reckon\'s protocol'],
    ['fine.json', 'unknown.json', 'unknown.json: name: shelf.py serves no policy "cautious" (it serves "steady", "wild"'],
  ];
  for (const [env, policy, message] of cases) {
    it(`${env}${policy ? ` with ${policy}` : ''}`, () => {
      const out = check(env, policy);
      expect(out.code).toBe(2);
      expect(out.stderr).toContain(message);
    });
  }

  it('a process policy needs a process environment; --noise visit and --start are refused, and --record of a policy without probabilities; each in one line naming the option and what to do', () => {
    const grid = reckon(['estimate', '--env', path.join(ENVS, 'warehouse.json'), '--policy', inDir('wild.json'), '--episodes', '10', '--no-store']);
    expect(grid.code).toBe(2);
    expect(grid.stderr).toContain('a "process" policy acts inside a process environment\'s program');
    const visit = reckon(['estimate', '--env', inDir('fine.json'), '--policy', inDir('uniform.json'), '--noise', 'visit', '--no-store']);
    expect(visit.code).toBe(2);
    expect(visit.stderr).toContain('--noise: visit needs a finite environment');
    expect(visit.stderr).toContain('use --noise step');
    const start = reckon(['estimate', '--env', inDir('fine.json'), '--policy', inDir('uniform.json'), '--start', '0', '--no-store']);
    expect(start.code).toBe(2);
    expect(start.stderr).toContain('--start: ');
    expect(start.stderr).toContain('leave out --start');
    const record = reckon(['estimate', '--env', inDir('fine.json'), '--policy', inDir('steady.json'), '--record', inDir('log.jsonl'), '--no-store']);
    expect(record.code).toBe(2);
    expect(record.stderr).toContain('--record: needs the behaviour policy\'s probabilities: policy "steady" of shelf.py has no probabilities(observation) method; give it one');
    for (const out of [visit, start, record]) expect(out.stderr.trim().split('\n')).toHaveLength(1);
  });
});


describe('the helper refuses a reckon of another protocol version', () => {
  it('answers an open of version 1 with a refusal that says which versions meet', () => {
    const bridge = path.resolve(__dirname, '../../python');
    const answer = spawnSync('python3', [inDir('shelf.py')], {
      cwd: dir,
      input: `${JSON.stringify({ reckon: 1, op: 'open', options: {} })}\n`,
      env: { ...process.env, PYTHONPATH: bridge },
      encoding: 'utf8',
      timeout: 30_000,
    });
    const reply = JSON.parse(answer.stdout.trim().split('\n')[0]);
    expect(reply.reckon).toBe(2);
    expect(reply.error.what).toBe('refused');
    expect(reply.error.message).toBe('reckon speaks protocol 1 and this reckon_bridge.py speaks 2: use the helper shipped with your reckon');
  });
});

describe('the horizon', () => {
  it('that reckon derives from reward_bounds cuts the episodes of an endless program on both paths', () => {
    const endless = tempFiles({
      'endless.py': [
        'from reckon_bridge import serve',
        'class Belt:',
        '    actions = ["run"]',
        '    discount = 0.9',
        '    reward_bounds = (0, 1)',
        '    def __init__(self, options): pass',
        '    def reset(self, seed): return 0, {}',
        '    def step(self, action): return 0, 1.0, False, False, {}',
        'class Run:',
        '    def act(self, observation, rng): return 0',
        'serve(Belt, policies={"run": lambda options, actions: Run()})',
        '',
      ].join('\n'),
      'endless.json': { kind: 'process', command: ['python3', './endless.py'] },
      'run.json': { kind: 'process', name: 'run' },
      'uniform.json': { kind: 'uniform' },
    });
    for (const policy of ['uniform.json', 'run.json']) {
      const out = json(reckon(['estimate', '--env', path.join(endless, 'endless.json'), '--policy', path.join(endless, policy), '--episodes', '50', '--seed', '1', '--no-store', '--json']));
      // γ^H·max|r|/(1−γ) ≤ 1e-4 first at H = 110 for γ = 0.9, max|r| = 1 (common practice: the geometric tail).
      expect(out.horizon).toBe(110);
      expect(out.mean_length).toBe(110);
      // Σ_{t<110} 0.9^t = (1 − 0.9^110)/0.1.
      expect(out.mean).toBeCloseTo((1 - 0.9 ** 110) / 0.1, 12);
    }
  });
});
