import type { Db } from './open.js';

export interface StoreCheck {
  readonly runs: number;
  readonly episodes: number;
  /** One line a problem, naming the run where there is one. */
  readonly problems: string[];
}

interface RunFacts {
  id: string;
  kind: string;
  status: string;
  first_episode: number;
  episodes_done: number;
  episodes_requested: number;
  options_json: string;
}

const MAX_PROBLEMS = 50;

/**
 * What `reckon runs check` reports: SQLite's own integrity check of every page, then the
 * store's invariants: each run's chunks cover exactly its counted episodes, contiguously from
 * its first episode, with blobs of the right size; a finished fixed-size run has all its
 * episodes; a comparison has its member runs.
 */
export function checkStore(db: Db): StoreCheck {
  const problems: string[] = [];
  const note = (line: string) => {
    if (problems.length < MAX_PROBLEMS) problems.push(line);
  };
  try {
    const rows = db.pragma('integrity_check') as { integrity_check: string }[];
    for (const row of rows) if (row.integrity_check !== 'ok') note(`SQLite: ${row.integrity_check}`);
  } catch (e) {
    note(`SQLite: the integrity check could not finish (${(e as Error).message})`);
  }
  let runs: RunFacts[] = [];
  try {
    runs = db.prepare('SELECT id, kind, status, first_episode, episodes_done, episodes_requested, options_json FROM runs').all() as RunFacts[];
  } catch (e) {
    note(`the runs table cannot be read (${(e as Error).message})`);
  }
  const chunksOf = db.prepare('SELECT first, count, length(returns) AS returns_bytes, length(lengths) AS lengths_bytes, length(finals) AS finals_bytes FROM episode_chunks WHERE run_id = ? ORDER BY first');
  const membersOf = db.prepare('SELECT COUNT(*) AS n FROM runs WHERE parent_id = ?');
  let episodes = 0;
  for (const run of runs) {
    try {
      if (run.kind === 'comparison') {
        const { n } = membersOf.get(run.id) as { n: number };
        if (n < 2) note(`run ${run.id}: a comparison with ${n} member run(s); it needs one a policy`);
        continue;
      }
      const chunks = chunksOf.all(run.id) as { first: number; count: number; returns_bytes: number; lengths_bytes: number; finals_bytes: number | null }[];
      let expected = run.first_episode;
      let counted = 0;
      for (const chunk of chunks) {
        if (chunk.first !== expected) note(`run ${run.id}: its episodes jump from ${expected} to ${chunk.first}`);
        if (chunk.returns_bytes !== chunk.count * 8 || chunk.lengths_bytes !== chunk.count * 4) {
          note(`run ${run.id}: the chunk of episodes ${chunk.first}… holds ${chunk.returns_bytes} bytes of returns and ${chunk.lengths_bytes} of lengths for ${chunk.count} episodes`);
        }
        if (chunk.finals_bytes !== null && chunk.finals_bytes !== chunk.count * 4) {
          note(`run ${run.id}: the chunk of episodes ${chunk.first}… holds ${chunk.finals_bytes} bytes of final states for ${chunk.count} episodes`);
        }
        expected = chunk.first + chunk.count;
        counted += chunk.count;
      }
      episodes += counted;
      if (counted !== run.episodes_done) note(`run ${run.id}: counts ${run.episodes_done} episodes but its chunks hold ${counted}`);
      const targetError = (JSON.parse(run.options_json) as { targetError?: number | null }).targetError ?? null;
      if (run.status === 'done' && targetError === null && counted !== run.episodes_requested) {
        note(`run ${run.id}: is done with ${counted} of the ${run.episodes_requested} episodes it asked for`);
      }
    } catch (e) {
      note(`run ${run.id}: cannot be read (${(e as Error).message})`);
    }
  }
  return { runs: runs.length, episodes, problems };
}
