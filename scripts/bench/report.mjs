// Turns the benchmark's raw runs into medians, ratios and goal checks (summarise), and those
// into Markdown tables (render) that can go into the README as they are.

export function median(values) {
  const sorted = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  if (sorted.length === 0) return NaN;
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

const ok = (runs) => runs.filter((r) => !r.error);
const rate = (runs, f) => median(ok(runs).map(f));

function find(trials, where) {
  return trials.find((t) => Object.entries(where).every(([k, v]) => t[k] === v)) ?? null;
}

/** Median steps per second, episodes per second, peak memory and the checksums of a trial's runs. */
function throughput(trial) {
  if (!trial) return null;
  const good = ok(trial.runs);
  if (good.length === 0) return { error: trial.runs[0]?.error ?? 'no runs' };
  const first = good[0];
  return {
    stepsPerSecond: rate(good, (r) => r.steps / r.seconds),
    episodesPerSecond: rate(good, (r) => r.episodes / r.seconds),
    stepsPerCpuSecond: rate(good, (r) => r.steps / r.cpuSeconds),
    seconds: median(good.map((r) => r.seconds)),
    peakMb: median(good.map((r) => r.maxRssMb)),
    episodes: first.episodes,
    steps: first.steps,
    meanReturn: first.sum / first.episodes,
    hashes: [...new Set(good.map((r) => r.hash))],
    runs: trial.runs.length,
    failed: trial.runs.length - good.length,
  };
}

/**
 * Per-episode and per-step cost from two workloads that differ only in episode length
 * (b: H 400, c: H 10, same MDP and policy): time = episodes·perEpisode + steps·perStep.
 */
function splitCosts(long, short) {
  if (!long || !short || long.error || short.error) return null;
  const [e1, s1, t1] = [long.episodes, long.steps, long.seconds];
  const [e2, s2, t2] = [short.episodes, short.steps, short.seconds];
  const det = e1 * s2 - e2 * s1;
  const perEpisode = (t1 * s2 - t2 * s1) / det;
  const perStep = (e1 * t2 - e2 * t1) / det;
  return { perEpisodeNs: perEpisode * 1e9, perStepNs: perStep * 1e9, overheadShare: (e2 * perEpisode) / t2 };
}

export function summarise(trials, prepared, machine) {
  const workloads = prepared.map((w) => {
    const pick = (runnerLabel) => throughput(find(trials, { group: 'workload', workload: w.id, runnerLabel }));
    const engine1 = pick('engine-1');
    const engineAll = pick('engine-all');
    const c = pick('c');
    const naive = pick('naive');
    const hashes = [engine1, engineAll, c, naive].filter((x) => x && !x.error).flatMap((x) => x.hashes);
    return {
      id: w.id,
      title: w.title,
      episodes: w.episodes,
      reference: w.reference,
      engine1,
      engineAll,
      c,
      naive,
      allWorkersOverOne: engineAll && engine1 ? engineAll.stepsPerSecond / engine1.stepsPerSecond : NaN,
      // CPU seconds a step costs on all workers over on one: 1 means the threads add no work, so
      // on otherwise idle cores the speed-up would approach the core count.
      cpuPerStepAllOverOne: engineAll && engine1 ? engine1.stepsPerCpuSecond / engineAll.stepsPerCpuSecond : NaN,
      engineOverC: c && engine1 ? engine1.stepsPerSecond / c.stepsPerSecond : NaN,
      engineOverCPerCpuSecond: c && engine1 ? engine1.stepsPerCpuSecond / c.stepsPerCpuSecond : NaN,
      engineOverNaive: naive && engine1 ? engine1.stepsPerSecond / naive.stepsPerSecond : NaN,
      identical: hashes.length > 0 ? new Set(hashes).size === 1 : null,
    };
  });
  const byId = Object.fromEntries(workloads.map((w) => [w.id, w]));
  const throughputScaling = ['a', 'b', 'd1', 'd2'].flatMap((id) => {
    const pick = (runnerLabel) => throughput(find(trials, { group: 'throughput', workload: id, runnerLabel }));
    const one = pick('engine-1');
    const all = pick('engine-all');
    if (!one || !all || one.error || all.error) return [];
    const hashes = [one, all].flatMap((x) => x.hashes);
    const unqueued = (runnerLabel) => median(ok(find(trials, { group: 'throughput', workload: id, runnerLabel }).runs).map(unqueuedSeconds));
    return [{
      id,
      episodes: one.episodes,
      one,
      all,
      allOverOne: all.stepsPerSecond / one.stepsPerSecond,
      // The same ratio from the times less each run's waits for a core (NaN without per-thread figures).
      allOverOneUnqueued: unqueued('engine-1') / unqueued('engine-all'),
      // CPU seconds a step costs on all workers over on one (as in the workload table).
      cpuPerStepAllOverOne: one.stepsPerCpuSecond / all.stepsPerCpuSecond,
      identical: new Set(hashes).size === 1,
    }];
  });
  const pinned = pinnedRows(trials);
  const threads = threadRows(trials);
  const scalingOf = (id) => throughputScaling.find((t) => t.id === id)?.allOverOne ?? byId[id]?.allWorkersOverOne;
  for (const w of workloads) {
    const ref = w.reference ? byId[w.reference] : null;
    w.overReference = ref && w.engine1 && ref.engine1 ? w.engine1.stepsPerSecond / ref.engine1.stepsPerSecond : NaN;
  }

  const costs = {
    engine: splitCosts(byId.b?.engine1, byId.c?.engine1),
    c: splitCosts(byId.b?.c, byId.c?.c),
  };

  const scalingRows = (group, sizes) =>
    sizes.map((size) => {
      const engine = throughput(find(trials, { group, size, runnerLabel: 'engine-1' }));
      const c = throughput(find(trials, { group, size, runnerLabel: 'c' }));
      const nsPerStep = (x) => (x && !x.error ? 1e9 / x.stepsPerSecond : NaN);
      const nsPerEpisode = (x) => (x && !x.error ? 1e9 / x.episodesPerSecond : NaN);
      return {
        size,
        stepsPerEpisode: engine && !engine.error ? engine.steps / engine.episodes : NaN,
        engineNsPerStep: nsPerStep(engine),
        engineNsPerEpisode: nsPerEpisode(engine),
        cNsPerStep: nsPerStep(c),
        engineOverC: nsPerStep(c) / nsPerStep(engine),
        identical: engine && c && !engine.error && !c.error ? engine.hashes[0] === c.hashes[0] : null,
      };
    });
  const sizesOf = (group) => [...new Set(trials.filter((t) => t.group === group).map((t) => t.size))];
  const states = scalingRows('states', sizesOf('states'));
  const horizons = scalingRows('horizon', sizesOf('horizon'));

  const memory = [...new Set(trials.filter((t) => t.group === 'memory').map((t) => t.runnerLabel))].map((label) => {
    const rows = sizesOf('memory').map((size) => {
      const runs = ok(find(trials, { group: 'memory', size, runnerLabel: label }).runs);
      return { episodes: size, peakMb: median(runs.map((r) => r.maxRssMb)) };
    });
    const [low, high] = [rows[0], rows.at(-1)];
    const bytesPerEpisode = rows.length >= 2 ? ((high.peakMb - low.peakMb) * 2 ** 20) / (high.episodes - low.episodes) : NaN;
    return { label, rows, bytesPerEpisode };
  });

  const storeTrial = find(trials, { group: 'store' });
  const storeRuns = storeTrial ? ok(storeTrial.runs) : [];
  const store = storeTrial
    ? storeRuns.length
      ? {
          episodes: storeRuns[0].episodes,
          writeSeconds: median(storeRuns.map((r) => r.seconds)),
          readSeconds: median(storeRuns.map((r) => r.readSeconds)),
          bytes: median(storeRuns.map((r) => r.bytes)),
          roundTrip: storeRuns.every((r) => r.roundTrip),
        }
      : { error: storeTrial.runs[0]?.error }
    : null;

  const sequences = trials
    .filter((t) => t.group === 'sequence')
    .map((t) => {
      const runs = ok(t.runs);
      return { method: t.runnerLabel, episodes: t.size, seconds: median(runs.map((r) => r.seconds)), cpuSeconds: median(runs.map((r) => r.cpuSeconds)), halfWidth: runs[0]?.halfWidth, rebuilds: runs[0]?.rebuilds };
    });

  const startupMs = (label) => {
    const t = find(trials, { group: 'startup', runnerLabel: label });
    return t ? median(ok(t.runs).map((r) => r.seconds * 1000)) : NaN;
  };
  const startup = { helpMs: startupMs('reckon --help'), nodeMs: startupMs('node -e 0') };

  const analysis = sizesOf('analysis').map((size) => {
    const runs = ok(find(trials, { group: 'analysis', size, runnerLabel: 'steps' })?.runs ?? []);
    const names = runs.length ? Object.keys(runs[0].steps) : [];
    return { episodes: size, distinct: runs[0]?.distinct ?? NaN, steps: Object.fromEntries(names.map((name) => [name, median(runs.map((r) => r.steps[name]))])) };
  });
  const commandSeconds = (label) => {
    const t = find(trials, { group: 'commands', runnerLabel: label });
    return t ? median(ok(t.runs).map((r) => r.seconds)) : NaN;
  };
  const commands = {
    episodes: sizesOf('commands')[0] ?? NaN,
    tDirect: commandSeconds('estimate --ci t (direct)'),
    tCareful: commandSeconds('estimate --ci t (careful)'),
    bootstrap: commandSeconds('estimate --ci bootstrap (direct)'),
    compare: commandSeconds('compare (direct, careful)'),
  };
  commands.compareOverTwoT = commands.compare / (commands.tDirect + commands.tCareful);
  commands.bootstrapOverT = commands.bootstrap / commands.tDirect;

  const goals = [];
  const goal = (name, target, measured, met) => goals.push({ name, target, measured, met: Number.isFinite(measured) ? met : null });
  goal('one worker on (b) vs the C loop', '>= 0.6x', byId.b?.engineOverC, byId.b?.engineOverC >= 0.6);
  for (const id of ['a', 'b']) {
    const w = byId[id];
    goal(`${machine.cores} workers vs one on (${id}), long run`, '>= 1.8x', scalingOf(id), scalingOf(id) >= 1.8);
    goal(`(${id}) results identical across workers and loops`, 'same hash', w?.identical === null ? NaN : w?.identical ? 1 : 0, w?.identical === true);
  }
  for (const id of ['d1', 'd2']) {
    const t = throughputScaling.find((x) => x.id === id);
    const long = t && t.one.seconds >= 2;
    goal(`${machine.cores} workers vs one on module (${id}), run of ${t ? fmt(t.one.seconds, 1) : '–'} s on one`, '>= 1.7x', long ? t.allOverOne : NaN, long && t.allOverOne >= 1.7);
    goal(`(${id}) results identical across workers`, 'same hash', t ? (t.identical ? 1 : 0) : NaN, t?.identical === true);
  }
  goal('compare at 1e6 vs two estimate --ci t', '<= 2x', commands.compareOverTwoT, commands.compareOverTwoT <= 2);
  goal('estimate --ci bootstrap at 1e6 vs --ci t', '<= 3x', commands.bootstrapOverT, commands.bootstrapOverT <= 3);
  goal('per-episode overhead on (c)', '< 20%', costs.engine?.overheadShare, costs.engine?.overheadShare < 0.2);
  goal('module gridworld (d2) vs compiled (a)', '>= 0.3x', byId.d2?.overReference, byId.d2?.overReference >= 0.3);
  goal('restocking with rng.poisson (d1) vs its hand-wired sampler (d3)', '>= 1x', byId.d1?.overReference, byId.d1?.overReference >= 1);
  const kept = memory.find((m) => m.label.startsWith('engine, returns kept'));
  goal('memory per kept episode (engine)', '<= 12 bytes', kept?.bytesPerEpisode, kept?.bytesPerEpisode <= 12);
  goal('reckon --help', '< 150 ms', startup.helpMs, startup.helpMs < 150);
  const betting = sequences.find((q) => q.method === 'betting');
  goal('betting sequence, 10⁶ episodes, one core (CPU time)', '<= 2 s', betting?.cpuSeconds, betting?.cpuSeconds <= 2);

  return { machine, workloads, throughputScaling, pinned, threads, costs, states, horizons, memory, store, sequences, startup, analysis, commands, goals };
}

/** The median over repeats of a ratio taken within each repeat (trials of one repeat ran back to back). */
function medianRatio(top, bottom) {
  const n = Math.min(top.runs.length, bottom.runs.length);
  const ratios = [];
  for (let r = 0; r < n; r++) {
    const a = top.runs[r];
    const b = bottom.runs[r];
    if (!a.error && !b.error) ratios.push(a.seconds / b.seconds);
  }
  return median(ratios);
}

/** The pinned module runs (taskset): wall times and, repeat by repeat, their ratios. */
function pinnedRows(trials) {
  const ids = [...new Set(trials.filter((t) => t.group === 'pinned').map((t) => t.workload))];
  return ids.map((id) => {
    const pick = (runnerLabel) => find(trials, { group: 'pinned', workload: id, runnerLabel });
    const one = pick('1 worker, core 0');
    const twoOnOne = pick('2 workers, core 0');
    const twoOnTwo = pick('2 workers, cores 0,1');
    const seconds = (t) => (t ? median(ok(t.runs).map((r) => r.seconds)) : NaN);
    const hashes = [one, twoOnOne, twoOnTwo].filter(Boolean).flatMap((t) => ok(t.runs).map((r) => r.hash));
    return {
      id,
      episodes: ok(one?.runs ?? [])[0]?.episodes ?? NaN,
      oneSeconds: seconds(one),
      twoOnOneSeconds: seconds(twoOnOne),
      twoOnTwoSeconds: seconds(twoOnTwo),
      // What the second core buys the two-worker run, and the speed-up over one worker on one core.
      secondCoreGain: twoOnOne && twoOnTwo ? medianRatio(twoOnOne, twoOnTwo) : NaN,
      speedUp: one && twoOnTwo ? medianRatio(one, twoOnTwo) : NaN,
      // Two workers sharing one core against one worker there: the pool's own cost (1 = none).
      poolCostOnOneCore: one && twoOnOne ? medianRatio(twoOnOne, one) : NaN,
      identical: hashes.length ? new Set(hashes).size === 1 : null,
    };
  });
}

/**
 * Where each thread's time went in the throughput and pinned runs
 * (medians over repeats, thread by thread in the order they were started).
 */
function threadRows(trials) {
  return trials
    .filter((t) => (t.group === 'throughput' || t.group === 'pinned') && ok(t.runs).some((r) => r.threads?.length))
    .map((t) => {
      const runs = ok(t.runs);
      const count = Math.max(...runs.map((r) => r.threads.length));
      const perThread = Array.from({ length: count }, (_, i) => {
        const of = (f) => median(runs.map((r) => (r.threads[i] ? f(r.threads[i], r) : NaN)));
        return {
          thread: runs[0].threads[i]?.thread ?? 'worker',
          startupSeconds: of((x) => x.startupSeconds),
          startupCpuSeconds: of((x) => x.startupCpuSeconds ?? NaN),
          readyAt: of((x) => x.readyAt),
          doneAt: of((x) => x.doneAt),
          busyShare: of((x, r) => x.busySeconds / r.seconds),
          idleSeconds: of((x) => x.idleSeconds),
          cpuSeconds: of((x) => x.cpuSeconds ?? NaN),
          queuedSeconds: of((x) => x.queuedSeconds ?? NaN),
          warmNsPerStep: of((x) => (x.cpuSeconds !== null && x.startupCpuSeconds !== null ? ((x.cpuSeconds - x.startupCpuSeconds) / x.steps) * 1e9 : NaN)),
          episodeShare: of((x, r) => x.episodes / r.episodes),
        };
      });
      return {
        id: t.workload,
        group: t.group,
        label: t.runnerLabel,
        seconds: median(runs.map((r) => r.seconds)),
        coresUsed: median(runs.map(coresUsed)),
        unqueuedSeconds: median(runs.map(unqueuedSeconds)),
        threads: perThread,
      };
    });
}

/** Cores the run's threads held on average: their CPU seconds over the run's wall time. */
function coresUsed(run) {
  const workers = run.threads?.filter((x) => x.cpuSeconds !== null) ?? [];
  return workers.length ? workers.reduce((n, x) => n + x.cpuSeconds, 0) / run.seconds : NaN;
}

/**
 * The run's wall time less the time its threads waited for a core: for each worker, when its
 * last block ended minus the time it sat in the run queue, and the latest of those. What the
 * run would have taken had nothing else wanted the cores, an estimate that holds up while other
 * work loads the machine. (A worker's start-up before the run began is counted in neither.)
 */
function unqueuedSeconds(run) {
  const workers = run.threads?.filter((x) => x.queuedSeconds !== null) ?? [];
  return workers.length ? Math.max(...workers.map((x) => x.doneAt - x.queuedSeconds)) : NaN;
}

const fmt = (x, digits = 1) => (Number.isFinite(x) ? x.toFixed(digits) : '–');
const millions = (x) => fmt(x / 1e6, x >= 1e7 ? 1 : 2);
const ratio = (x) => (Number.isFinite(x) ? `${x.toFixed(2)}×` : '–');
const yesNo = (x) => (x === null || x === undefined ? '–' : x ? 'yes' : '**no**');

export function render(s) {
  const m = s.machine;
  const lines = [];
  lines.push(`Machine: ${m.cpu}, ${m.cores} cores, ${m.memoryGb} GB; ${m.os}; Node ${m.node}; ${m.c}.`);
  lines.push(`Run: ${m.date}, ${m.repeats} repeats of each trial in fresh processes, medians; load average ${m.loadAverageBefore.join(' ')} before, ${m.loadAverageAfter.join(' ')} after; ${m.seconds} s in all.`);
  lines.push('');
  lines.push('| workload | steps/ep | engine 1 worker: M steps/s | k ep/s | all workers: M steps/s | ×1 worker | CPU/step vs 1 worker | C loop: M steps/s | engine/C | naive JS: M steps/s | engine/naive | peak MB (1 / all) | same returns |');
  lines.push('|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|:---:|');
  for (const w of s.workloads) {
    const e1 = w.engine1 ?? {};
    const ea = w.engineAll ?? {};
    lines.push(
      `| (${w.id}) ${w.title}, ${w.episodes.toLocaleString('en')} episodes | ${fmt(e1.steps / e1.episodes)} | ${millions(e1.stepsPerSecond)} | ${fmt(e1.episodesPerSecond / 1e3, 0)} | ` +
        `${millions(ea.stepsPerSecond)} | ${ratio(w.allWorkersOverOne)} | ${ratio(w.cpuPerStepAllOverOne)} | ${w.c ? millions(w.c.stepsPerSecond) : '–'} | ${ratio(w.engineOverC)} | ` +
        `${w.naive ? millions(w.naive.stepsPerSecond) : '–'} | ${ratio(w.engineOverNaive)} | ${fmt(e1.peakMb, 0)} / ${fmt(ea.peakMb, 0)} | ${yesNo(w.identical)} |`,
    );
  }
  const errors = s.workloads.flatMap((w) => ['engine1', 'engineAll', 'c', 'naive'].filter((k) => w[k]?.error).map((k) => `(${w.id}) ${k}: ${w[k].error}`));
  if (errors.length) lines.push('', ...errors.map((e) => `Failed: ${e}`));
  if (s.throughputScaling?.length) {
    lines.push('', 'Worker scaling on longer runs (thread start-up and JIT warm-up amortised), engine only:', '');
    lines.push('| workload | episodes | 1 worker: s | M steps/s | all workers: M steps/s | all ÷ 1 | all ÷ 1, less queueing | CPU/step vs 1 worker | same returns |');
    lines.push('|---|---:|---:|---:|---:|---:|---:|---:|:---:|');
    for (const t of s.throughputScaling) {
      lines.push(
        `| (${t.id}) | ${t.episodes.toLocaleString('en')} | ${fmt(t.one.seconds, 2)} | ${millions(t.one.stepsPerSecond)} | ${millions(t.all.stepsPerSecond)} | ${ratio(t.allOverOne)} | ${ratio(t.allOverOneUnqueued)} | ${ratio(t.cpuPerStepAllOverOne)} | ${yesNo(t.identical)} |`,
      );
    }
  }
  if (s.pinned?.length) {
    lines.push('', 'Code environments pinned by taskset, repeats interleaved (ratios taken within each repeat, then the median):', '');
    lines.push('| workload | episodes | 1 worker, core 0: s | 2 workers, core 0: s | 2 workers, cores 0,1: s | 2 workers, two cores ÷ one | 1 worker on one core ÷ 2 on two | pool cost on one core | same returns |');
    lines.push('|---|---:|---:|---:|---:|---:|---:|---:|:---:|');
    for (const p of s.pinned) {
      lines.push(
        `| (${p.id}) | ${Number.isFinite(p.episodes) ? p.episodes.toLocaleString('en') : '–'} | ${fmt(p.oneSeconds, 2)} | ${fmt(p.twoOnOneSeconds, 2)} | ${fmt(p.twoOnTwoSeconds, 2)} | ` +
          `${ratio(p.secondCoreGain)} | ${ratio(p.speedUp)} | ${ratio(p.poolCostOnOneCore)} | ${yesNo(p.identical)} |`,
      );
    }
  }
  const d2 = s.workloads.find((w) => w.id === 'd2');
  if (d2?.reference) {
    const ref = s.workloads.find((w) => w.id === d2.reference);
    lines.push('');
    lines.push(
      `Plug-in interface: the gridworld as a module (d2) runs at ${ratio(d2.overReference)} the compiled gridworld (${d2.reference}); ` +
        `mean return ${fmt(d2.engine1?.meanReturn, 4)} against ${fmt(ref?.engine1?.meanReturn, 4)} (same model, different draws).`,
    );
  }
  const d1 = s.workloads.find((w) => w.id === 'd1');
  if (d1?.reference) {
    const ref = s.workloads.find((w) => w.id === d1.reference);
    lines.push('');
    lines.push(
      `Named distributions: the restocking module with rng.poisson (d1) runs at ${ratio(d1.overReference)} its hand-wired form (${d1.reference}); ` +
        `mean return ${fmt(d1.engine1?.meanReturn, 4)} against ${fmt(ref?.engine1?.meanReturn, 4)}.`,
    );
  }
  lines.push('');
  const costRow = (name, x) => `| ${name} | ${fmt(x?.perEpisodeNs, 0)} | ${fmt(x?.perStepNs, 1)} | ${fmt(100 * x?.overheadShare, 1)}% |`;
  lines.push('Per-episode cost, from (b) and (c) (same MDP, horizons 400 and 10): time = episodes × per-episode + steps × per-step.');
  lines.push('');
  lines.push('| loop | ns per episode | ns per step | share of (c) spent per episode |');
  lines.push('|---|---:|---:|---:|');
  lines.push(costRow('engine, 1 worker', s.costs.engine));
  lines.push(costRow('C', s.costs.c));
  lines.push('');
  const scaling = (title, key, rows) => {
    lines.push(title);
    lines.push('');
    lines.push(`| ${key} | steps/ep | engine ns/step | engine µs/episode | C ns/step | engine/C | same returns |`);
    lines.push('|---:|---:|---:|---:|---:|---:|:---:|');
    for (const r of rows) {
      lines.push(`| ${r.size.toLocaleString('en')} | ${fmt(r.stepsPerEpisode)} | ${fmt(r.engineNsPerStep)} | ${fmt(r.engineNsPerEpisode / 1000, 2)} | ${fmt(r.cNsPerStep)} | ${ratio(r.engineOverC)} | ${yesNo(r.identical)} |`);
    }
    lines.push('');
  };
  if (s.states.length) scaling('Time against the number of states (random MDPs, 4 actions, 3 successors, episodes of about 120 steps; the loop alone, one thread):', 'states', s.states);
  if (s.horizons.length) scaling('Time against the horizon (400 states, no terminal states, so every episode runs to the horizon):', 'horizon', s.horizons);
  if (s.memory.length) {
    const sizes = s.memory[0].rows.map((r) => r.episodes.toLocaleString('en'));
    lines.push(`Peak memory of a run of (c) on all workers, against the number of episodes:`);
    lines.push('');
    lines.push(`| run | ${sizes.map((n) => `peak MB, ${n} episodes`).join(' | ')} | bytes per extra episode |`);
    lines.push(`|---|${sizes.map(() => '---:').join('|')}|---:|`);
    for (const m of s.memory) lines.push(`| ${m.label} | ${m.rows.map((r) => fmt(r.peakMb, 0)).join(' | ')} | ${fmt(m.bytesPerEpisode, 1)} |`);
    lines.push('');
  }
  if (s.store) {
    lines.push(
      s.store.error
        ? `Storing episodes: failed (${s.store.error}).`
        : `Storing ${s.store.episodes.toLocaleString('en')} episodes in the run store (chunks of 16,384): ${fmt(s.store.writeSeconds, 2)} s to write ` +
            `(${fmt((s.store.writeSeconds / s.store.episodes) * 1e9, 0)} ns an episode), ${fmt(s.store.bytes / 2 ** 20, 1)} MB on disk ` +
            `(${fmt(s.store.bytes / s.store.episodes, 1)} bytes an episode), ${fmt(s.store.readSeconds, 2)} s to read back${s.store.roundTrip ? ' (identical)' : ' (**not identical**)'}.`,
    );
  }
  if (s.sequences?.length) {
    lines.push('');
    lines.push(`A target-error run's confidence sequence over ${s.sequences[0].episodes.toLocaleString('en')} returns (Bernoulli(0.1)), each added and checked in turn, one core:`);
    lines.push('');
    lines.push('| sequence | wall seconds | CPU seconds | half-width at the end | grid rebuilds |');
    lines.push('|---|---:|---:|---:|---:|');
    for (const q of s.sequences) lines.push(`| ${q.method} | ${fmt(q.seconds, 2)} | ${fmt(q.cpuSeconds, 2)} | ${Number.isFinite(q.halfWidth) ? q.halfWidth.toPrecision(3) : '–'} | ${q.rebuilds ?? '–'} |`);
    lines.push('');
  }
  if (s.analysis?.length) {
    const names = Object.keys(s.analysis[0].steps);
    lines.push('Figures computed after sampling, each timed alone (seconds, cold, in a fresh process) on the demo\'s returns (picker-direct; paired with picker-careful):');
    lines.push('');
    lines.push(`| step | ${s.analysis.map((a) => `n = ${a.episodes.toLocaleString('en')} (${a.distinct.toLocaleString('en')} distinct)`).join(' | ')} |`);
    lines.push(`|---|${s.analysis.map(() => '---:').join('|')}|`);
    for (const name of names) lines.push(`| ${name} | ${s.analysis.map((a) => fmt(a.steps[name], 3)).join(' | ')} |`);
    lines.push('');
  }
  if (Number.isFinite(s.commands?.compare)) {
    const c = s.commands;
    lines.push(
      `Whole commands at ${c.episodes.toLocaleString('en')} episodes a policy (demo, --no-store, wall seconds): estimate --ci t ${fmt(c.tDirect, 2)} (direct), ${fmt(c.tCareful, 2)} (careful); ` +
        `estimate --ci bootstrap ${fmt(c.bootstrap, 2)} (${ratio(c.bootstrapOverT)} t); compare ${fmt(c.compare, 2)} (${ratio(c.compareOverTwoT)} the two t runs).`,
    );
    lines.push('');
  }
  if (Number.isFinite(s.startup.helpMs)) {
    lines.push(`Start-up: \`reckon --help\` ${fmt(s.startup.helpMs, 0)} ms (median); Node alone (\`node -e 0\`) ${fmt(s.startup.nodeMs, 0)} ms.`);
  }
  lines.push('');
  lines.push("reckon's design targets for speed and memory, and this run against them:");
  lines.push('');
  lines.push('| design target | threshold | measured | met |');
  lines.push('|---|---|---:|:---:|');
  for (const g of s.goals) {
    const measured = g.name.includes('identical') ? (g.met === null ? '–' : g.met ? 'same' : 'differ') : g.name.includes('overhead') ? `${fmt(100 * g.measured, 1)}%` : g.name.includes('help') ? `${fmt(g.measured, 0)} ms` : g.name.includes('memory') ? `${fmt(g.measured, 1)} B` : g.name.includes('sequence') ? `${fmt(g.measured, 2)} s` : ratio(g.measured);
    lines.push(`| ${g.name} | ${g.target} | ${measured} | ${yesNo(g.met)} |`);
  }
  lines.push('');
  return lines.join('\n');
}

/** `--threads`: the per-thread table of the long runs. */
export function renderThreads(s) {
  if (!s.threads?.length) return '';
  const lines = ['', 'Threads of the long runs (medians over repeats; times in seconds from the run\'s start; CPU and queue time from Linux\'s per-thread scheduler figures):', ''];
  lines.push('| run | thread | start-up (its CPU) | ready at | last block at | run | busy | idle | episodes | CPU | queued for a core | CPU ns/step after start-up | cores held | run less queueing |');
  lines.push('|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|');
  for (const row of s.threads) {
    const name = `(${row.id}) ${row.group === 'pinned' ? row.label : row.label === 'engine-1' ? '1 worker' : 'all workers'}`;
    row.threads.forEach((t, i) => {
      const pct = (x) => (Number.isFinite(x) ? `${(100 * x).toFixed(0)}%` : '–');
      lines.push(
        `| ${i === 0 ? name : ''} | ${i + 1}${t.thread === 'caller' ? ' (caller)' : ''} | ${fmt(t.startupSeconds, 2)} (${fmt(t.startupCpuSeconds, 2)}) | ${fmt(t.readyAt, 2)} | ${fmt(t.doneAt, 2)} | ${fmt(row.seconds, 2)} | ` +
          `${pct(t.busyShare)} | ${fmt(t.idleSeconds, 3)} | ${pct(t.episodeShare)} | ${fmt(t.cpuSeconds, 2)} | ${fmt(t.queuedSeconds, 2)} | ${fmt(t.warmNsPerStep, 1)} | ` +
          `${i === 0 ? fmt(row.coresUsed, 2) : ''} | ${i === 0 ? fmt(row.unqueuedSeconds, 2) : ''} |`,
      );
    });
  }
  lines.push('');
  return lines.join('\n');
}
