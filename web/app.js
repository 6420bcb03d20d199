// The review page: stored runs, one run's plots and figures, comparisons, and a form to start
// an evaluation. Plain modules, no build step; every request goes to this page's own server.
import { drawPlot } from './plots.js';

const main = document.getElementById('main');

// ---- talking to the server ------------------------------------------------------------

/** The access token, when the server needs one: given once as ?token=…, then kept for the tab. */
const token = (() => {
  const fromUrl = new URLSearchParams(location.search).get('token');
  if (fromUrl) sessionStorage.setItem('reckon-token', fromUrl);
  return sessionStorage.getItem('reckon-token');
})();

async function api(path, options = {}) {
  const headers = { ...(options.headers ?? {}) };
  if (token) headers.authorization = `Bearer ${token}`;
  if (options.body !== undefined) headers['content-type'] = 'application/json';
  const response = await fetch(path, { ...options, headers });
  const body = await response.json().catch(() => ({ error: `${response.status} ${response.statusText}` }));
  if (!response.ok) {
    const error = new Error(body.error ?? response.statusText);
    error.status = response.status;
    error.field = body.field ?? null;
    throw error;
  }
  return body;
}

function eventsUrl(id) {
  return `/api/runs/${encodeURIComponent(id)}/events${token ? `?token=${encodeURIComponent(token)}` : ''}`;
}

// ---- small helpers -----------------------------------------------------------------------

function el(tag, attributes = {}, ...children) {
  const node = document.createElement(tag);
  for (const [key, value] of Object.entries(attributes)) {
    if (value === null || value === undefined || value === false) continue;
    if (key.startsWith('on')) node.addEventListener(key.slice(2), value);
    else node.setAttribute(key, value === true ? '' : String(value));
  }
  for (const child of children.flat(Infinity)) {
    if (child === null || child === undefined) continue;
    node.append(child instanceof Node ? child : document.createTextNode(String(child)));
  }
  return node;
}

/** About four significant digits, with a true minus sign. */
function num(x, digits = 4) {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  if (x === 0) return '0';
  const magnitude = Math.abs(x);
  const text = magnitude >= 1e-3 && magnitude < 1e9 ? x.toFixed(Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)))) : x.toExponential(digits - 1);
  return text.replace(/^-/, '−');
}

const count = (n) => (n === null || n === undefined ? '–' : Math.round(n).toLocaleString('en-US'));

function seconds(s) {
  if (!Number.isFinite(s)) return '–';
  if (s < 1) return `${(s * 1000).toFixed(0)} ms`;
  if (s < 120) return `${s.toFixed(1)} s`;
  if (s < 7200) return `${(s / 60).toFixed(1)} min`;
  return `${(s / 3600).toFixed(1)} h`;
}

const STATUS_TEXT = { done: 'done', running: 'running', queued: 'queued', interrupted: 'interrupted', failed: 'failed' };

function badge(status) {
  return el('span', { class: `badge badge-${status}` }, STATUS_TEXT[status] ?? status);
}

function progressBar(progress) {
  if (!progress || !progress.total) return null;
  // A target-error run: the share of the way its half-width has come, which shrinks like 1/√n,
  // so (target / half-width)² is about the share of the episodes it will need.
  if (progress.target_error) {
    const hw = progress.half_width;
    const share = hw > 0 && Number.isFinite(hw) ? Math.min(1, (progress.target_error / hw) ** 2) : 0;
    return el('span', { class: 'progress', title: `half-width ${hw ? num(hw, 3) : '–'} against the target ±${num(progress.target_error, 3)}` }, el('span', { style: `width:${(share * 100).toFixed(1)}%` }));
  }
  const share = Math.min(1, progress.done / progress.total);
  return el('span', { class: 'progress', title: `${count(progress.done)} of ${count(progress.total)} episodes` }, el('span', { style: `width:${(share * 100).toFixed(1)}%` }));
}

/** Like replaceChildren, leaving out the parts a page does not have (null). */
function show(...parts) {
  main.replaceChildren(...parts.filter((p) => p !== null && p !== undefined));
}

function showError(error) {
  main.replaceChildren(el('p', { class: 'error', role: 'alert' }, error.message));
}

let cleanup = [];
function onLeave(fn) {
  cleanup.push(fn);
}

// ---- runs list ---------------------------------------------------------------------------

/** The list's filters and order, kept in the address (#/?label=…&sort=…) so a view can be shared. */
const FILTER_KEYS = ['env', 'policy', 'label', 'text', 'status', 'kind', 'since', 'until'];
const SERVER_FILTERS = ['policy', 'label', 'text', 'status', 'kind', 'since', 'until'];

function listStateFromHash() {
  const query = new URLSearchParams((location.hash.split('?')[1] ?? ''));
  const state = { sort: query.get('sort') ?? 'created_at', descending: (query.get('order') ?? 'desc') !== 'asc' };
  for (const key of FILTER_KEYS) state[key] = query.get(key) ?? '';
  return state;
}

function listStateToHash(state) {
  const query = new URLSearchParams();
  for (const key of FILTER_KEYS) if (state[key]) query.set(key, state[key]);
  if (state.sort !== 'created_at') query.set('sort', state.sort);
  if (!state.descending) query.set('order', 'asc');
  const text = query.toString();
  return text ? `#/?${text}` : '#/';
}

const COLUMNS = [
  { key: 'id', label: 'run' },
  { key: 'created_at', label: 'started' },
  { key: 'env', label: 'environment' },
  { key: 'policy', label: 'policy' },
  { key: 'labels', label: 'labels' },
  { key: 'episodes', label: 'episodes' },
  { key: 'mean', label: 'mean ± half-width' },
  { key: 'status', label: 'status' },
];

function sortValue(row, key) {
  if (key === 'mean') return row.summary?.mean ?? -Infinity;
  if (key === 'labels') return Object.entries(row.labels ?? {}).map(([k, v]) => `${k}=${v}`).join(', ');
  return row[key] ?? '';
}

function runsUrl(state) {
  const query = new URLSearchParams({ limit: '500' });
  for (const key of SERVER_FILTERS) if (state[key]) query.set(key, state[key]);
  return `/api/runs?${query}`;
}

async function renderRunList() {
  const listState = listStateFromHash();
  let rows = await api(runsUrl(listState));
  const environments = [...new Set([...rows.map((r) => r.env), listState.env].filter(Boolean))].sort();
  const message = el('p', { class: 'field-error', id: 'filter-error', role: 'alert' });
  const filterEnv = el('select', { id: 'filter-env', 'aria-label': 'environment' }, el('option', { value: '' }, 'all environments'), environments.map((e) => el('option', { value: e, selected: e === listState.env }, e)));
  const input = (key, attributes) => el('input', { id: `filter-${key}`, value: listState[key], 'aria-label': key, ...attributes });
  const filterPolicy = input('policy', { type: 'search', placeholder: 'policy contains…' });
  const filterLabel = input('label', { type: 'search', placeholder: 'key=value or key' });
  const filterText = input('text', { type: 'search', placeholder: 'in notes and file names' });
  const choice = (key, values, all) => el('select', { id: `filter-${key}`, 'aria-label': key }, el('option', { value: '' }, all), values.map((v) => el('option', { value: v, selected: v === listState[key] }, v)));
  const filterStatus = choice('status', ['done', 'running', 'interrupted', 'failed'], 'any status');
  const filterKind = choice('kind', ['estimate', 'comparison', 'offpolicy'], 'any kind');
  const filterSince = input('since', { type: 'date' });
  const filterUntil = input('until', { type: 'date' });
  const table = el('table', { class: 'runs', id: 'runs-table' });
  const draw = (data) => {
    const shown = data
      .filter((r) => !listState.env || r.env === listState.env)
      .sort((a, b) => {
        const x = sortValue(a, listState.sort);
        const y = sortValue(b, listState.sort);
        const order = x < y ? -1 : x > y ? 1 : 0;
        return listState.descending ? -order : order;
      });
    const head = el('tr', {}, COLUMNS.map((c) => el('th', { scope: 'col', 'aria-sort': listState.sort === c.key ? (listState.descending ? 'descending' : 'ascending') : null },
      el('button', { type: 'button', class: 'sort', 'data-key': c.key, onclick: () => { listState.descending = listState.sort === c.key ? !listState.descending : c.key === 'created_at'; listState.sort = c.key; remember(); draw(data); } },
        c.label, listState.sort === c.key ? (listState.descending ? ' ▼' : ' ▲') : ''))));
    const body = shown.map((r) => {
      const link = r.kind === 'comparison' ? `#/comparisons/${r.id}` : r.kind === 'offpolicy' ? `#/offpolicy/${r.id}` : `#/runs/${r.id}`;
      const summary = r.summary;
      const first = r.kind === 'comparison' ? summary?.differences?.[0] : null;
      const mean = r.kind === 'offpolicy' ? offPolicyHeadline(summary) : r.kind === 'comparison' ? (summary?.groups?.length ? summary.groups.map((g) => `${g.name} ${num(g.mean)} ± ${num(g.half_width, 2)}`).join(', ') : first ? `Δ[${first.a}−${first.b}] ${num(first.mean)} ± ${num(first.half_width, 2)}` : 'comparison') : summary?.mean !== undefined ? `${num(summary.mean)} ± ${num(summary.ci?.halfWidth ?? summary.ci?.half_width, 2)}` : r.progress?.mean != null ? `${num(r.progress.mean)} ± ${num(r.progress.half_width, 2)} (so far)` : '–';
      const done = r.progress ? r.progress.done : r.episodes;
      return el('tr', { 'data-id': r.id, 'data-status': r.status },
        el('td', {}, el('a', { href: link }, r.id)),
        el('td', {}, new Date(r.created_at).toLocaleString()),
        el('td', {}, r.env),
        el('td', {}, r.policy),
        el('td', {}, Object.entries(r.labels ?? {}).map(([k, v]) => el('span', { class: 'label' }, `${k}=${v}`))),
        el('td', { class: 'number' }, r.status === 'done' ? count(done) : `${count(done)} / ${count(r.episodes_requested)}`, r.status === 'running' ? progressBar(r.progress ?? { done, total: r.episodes_requested }) : null),
        el('td', { class: 'number' }, mean),
        el('td', {}, badge(r.status)));
    });
    table.replaceChildren(el('thead', {}, head), el('tbody', {}, body.length ? body : el('tr', {}, el('td', { colspan: COLUMNS.length }, 'No runs match.'))));
  };
  // The address keeps the view; replacing it (not pushing) keeps Back meaning "the page before".
  const remember = () => history.replaceState(null, '', listStateToHash(listState));
  let pending = null;
  const refetch = () => {
    clearTimeout(pending);
    pending = setTimeout(async () => {
      remember();
      try {
        rows = await api(runsUrl(listState));
        message.textContent = '';
        draw(rows);
      } catch (error) {
        message.textContent = error.message;
      }
    }, 250);
  };
  onLeave(() => clearTimeout(pending));
  filterEnv.addEventListener('change', () => { listState.env = filterEnv.value; remember(); draw(rows); });
  for (const [key, control] of [['policy', filterPolicy], ['label', filterLabel], ['text', filterText]]) control.addEventListener('input', () => { listState[key] = control.value.trim(); refetch(); });
  for (const [key, control] of [['status', filterStatus], ['kind', filterKind], ['since', filterSince], ['until', filterUntil]]) control.addEventListener('change', () => { listState[key] = control.value; refetch(); });
  draw(rows);
  const anyFilter = FILTER_KEYS.some((key) => listState[key]);
  show(
    el('h1', {}, 'Stored runs'),
    el('div', { class: 'filters', id: 'filters' },
      el('label', {}, 'Environment ', filterEnv), el('label', {}, 'Policy ', filterPolicy), el('label', {}, 'Label ', filterLabel),
      el('label', {}, 'Text ', filterText), el('label', {}, 'Status ', filterStatus), el('label', {}, 'Kind ', filterKind),
      el('label', {}, 'From ', filterSince), el('label', {}, 'to ', filterUntil),
      el('a', { href: '#/', id: 'clear-filters' }, 'Clear filters'),
      el('a', { class: 'button', href: '#/new' }, 'Start an evaluation')),
    message,
    rows.length || anyFilter ? table : el('p', {}, 'No runs yet. Run ', el('code', {}, 'npm start'), ' (the demo) or start an evaluation.'),
  );
  // Live progress: refresh while anything runs or waits.
  if (rows.some((r) => r.status === 'running' || r.status === 'queued')) {
    const timer = setTimeout(async () => {
      try {
        const fresh = await api(runsUrl(listState));
        rows.splice(0, rows.length, ...fresh);
        draw(rows);
        if (rows.some((r) => r.status === 'running' || r.status === 'queued')) route();
      } catch { /* the next navigation retries */ }
    }, 1000);
    onLeave(() => clearTimeout(timer));
  }
}

// ---- one run -----------------------------------------------------------------------------

const FILE_STATE = { unchanged: 'unchanged on disk', changed: 'changed on disk since the run', missing: 'missing on disk now', appeared: 'missing then, present now' };

/** Where a run came from: the command that reproduces it (with a copy button), its files checked against the disk, reckon and the machine. */
function provenanceBlock(run) {
  if (!run.reproduce_command) return null;
  const status = el('span', { class: 'copy-status', role: 'status' });
  const command = el('code', { id: 'reproduce-command' }, run.reproduce_command);
  const copy = el('button', { type: 'button', id: 'copy-command', class: 'copy' }, 'Copy');
  copy.addEventListener('click', async () => {
    try {
      await navigator.clipboard.writeText(run.reproduce_command);
      status.textContent = 'Copied.';
    } catch {
      // No clipboard (an insecure origin, a denied permission): select the text for Ctrl-C.
      const range = document.createRange();
      range.selectNodeContents(command);
      getSelection().removeAllRanges();
      getSelection().addRange(range);
      status.textContent = 'Selected: press Ctrl-C to copy.';
    }
  });
  const m = run.machine ?? {};
  const files = run.files;
  return el('section', { class: 'provenance', id: 'provenance' },
    el('h2', {}, 'Provenance'),
    el('p', {}, 'Reproduce with ', command, ' ', copy, ' ', status),
    run.reproduce_from_files === false ? el('p', { class: 'warning' }, 'The definitions were given inline, not from files: save them to files first (Definitions and seed, below).') : null,
    files === null ? el('p', {}, 'Definition files: not recorded (stored by an older reckon).')
      : files.length === 0 ? el('p', {}, 'Definition files: none (definitions given inline).')
      : el('table', { class: 'figures', id: 'definition-files' },
        el('thead', {}, el('tr', {}, ['file', 'part of', 'sha256 at the start', 'now'].map((h) => el('th', { scope: 'col' }, h)))),
        el('tbody', {}, files.map((f) => el('tr', { 'data-state': f.on_disk },
          el('td', {}, f.path), el('td', {}, f.role), el('td', {}, el('code', {}, f.sha256 ? `${f.sha256.slice(0, 12)}…` : '–')),
          el('td', { class: f.on_disk === 'unchanged' ? null : 'error' }, FILE_STATE[f.on_disk] ?? f.on_disk))))),
    el('p', {}, `reckon ${run.tool_version ?? run.reckon_version ?? '?'} on ${[m.host, m.cores ? `${m.cores} cores` : null, m.cpu, m.node ? `Node ${m.node}` : null, m.platform].filter(Boolean).join(', ')}`));
}

/** A run's labels (key=value) and notes, oldest first, with fields that add more (POST /api/runs/:id/labels, …/notes). */
function annotationsBlock(run) {
  const id = run.run_id ?? run.id;
  const labels = Object.entries(run.labels ?? {});
  const notes = run.notes ?? [];
  const message = el('span', { class: 'field-error', id: 'annotation-error', role: 'alert' });
  const labelInput = el('input', { id: 'add-label', type: 'text', placeholder: 'key=value', 'aria-label': 'label to add' });
  const noteInput = el('input', { id: 'add-note', type: 'text', placeholder: 'a note', 'aria-label': 'note to add', size: 40 });
  const send = async (path, body) => {
    try {
      await api(`/api/runs/${encodeURIComponent(id)}/${path}`, { method: 'POST', body: JSON.stringify(body) });
      route();
    } catch (error) {
      message.textContent = error.message;
    }
  };
  const addLabel = el('button', { type: 'button', id: 'add-label-button', class: 'copy' }, 'Add label');
  addLabel.addEventListener('click', () => {
    const text = labelInput.value.trim();
    const at = text.indexOf('=');
    if (at < 1) { message.textContent = 'a label is key=value, e.g. reported=yes'; return; }
    send('labels', { labels: { [text.slice(0, at).trim()]: text.slice(at + 1).trim() } });
  });
  const addNote = el('button', { type: 'button', id: 'add-note-button', class: 'copy' }, 'Add note');
  addNote.addEventListener('click', () => send('notes', { text: noteInput.value }));
  return el('section', { class: 'annotations', id: 'annotations' },
    labels.length ? el('p', { class: 'labels' }, 'Labels: ', labels.map(([k, v]) => el('span', { class: 'label', 'data-key': k }, `${k}=${v}`))) : null,
    notes.length ? el('ul', { class: 'notes' }, notes.map((n) => el('li', {}, el('time', { datetime: n.added_at }, new Date(n.added_at).toLocaleString()), ' ', n.text))) : null,
    el('details', { class: 'annotate' }, el('summary', {}, 'Add a label or a note'),
      el('p', {}, labelInput, ' ', addLabel, ' ', noteInput, ' ', addNote, ' ', message)));
}

/** A run's noise mode in words; runs stored before the mode was recorded are step-keyed. */
function noiseWords(mode) {
  return mode === 'visit' ? 'keyed by state visit (--noise visit)' : 'keyed by step (--noise step)';
}

function figureRows(run) {
  const rows = [
    ['mean return', num(run.mean)],
    [`${(run.ci.level * 100).toFixed(0)}% interval (${run.ci.method})`, centred(run) ? `${num(run.ci.low)} to ${num(run.ci.high)}  (± ${num(run.ci.half_width, 3)})` : `${num(run.ci.low)} to ${num(run.ci.high)}  (not centred on the mean)`],
    ...(run.exact_value === null || run.exact_value === undefined ? [] : [['exact value', `${num(run.exact_value, 6)} (reckon exact): ${run.exact_inside ? 'inside' : 'OUTSIDE'} the interval`]]),
    ['standard deviation', num(run.std)],
    ...episodeRows(run),
    ['seed', String(run.seed)],
    ['noise', noiseWords(run.noise)],
    ['start', run.start ?? 'start distribution'],
    ['discount, horizon', `${run.discount}, ${count(run.horizon)} steps${run.horizon_derived ? ' (derived)' : ''}`],
    ['truncation bound', run.truncation_bound === null ? 'none' : num(run.truncation_bound, 2)],
    ['mean episode length', `${num(run.mean_length)} steps (longest ${count(run.longest_episode)})`],
    ['rate', run.steps_per_second ? `${count(run.steps_per_second)} steps/s on ${run.workers} worker${run.workers === 1 ? '' : 's'}` : '–'],
  ];
  return el('table', { class: 'figures' }, el('tbody', {}, rows.map(([k, v]) => el('tr', {}, el('th', { scope: 'row' }, k), el('td', {}, v)))));
}

/**
 * A fixed-size run: its episodes of those asked for. A target-error run: its target and
 * whether it was reached, and its episodes against the cap only as a cap.
 */
function episodeRows(run) {
  if (run.target_error === null || run.target_error === undefined) return [['episodes', `${count(run.episodes)} of ${count(run.episodes_requested)}`]];
  const target = `±${num(run.target_error, 3)}`;
  return [
    ['target half-width', run.target_reached ? `${target}: reached after ${count(run.episodes)} episodes` : `${target}: not reached (±${num(run.ci.half_width, 3)} after ${count(run.episodes)} episodes)`],
    ['episodes', `${count(run.episodes)} (at most ${count(run.max_episodes ?? run.episodes_requested)})`],
  ];
}

/** Whether the interval is centred on the mean: only then is a ± shown (as the command line does). */
function centred(run) {
  const centre = (run.ci.low + run.ci.high) / 2;
  return Math.abs(centre - run.mean) <= 1e-9 * Math.max(1, Math.abs(run.mean)) + 1e-3 * run.ci.half_width;
}

/** The events the risk table shows at first: ending in each terminal (by letter or name), and running the whole horizon. */
function defaultEvents(run) {
  const terminals = (run.terminals ?? []).slice(0, 12).map((t) => `terminal=${t.name}`);
  return [...terminals, `length>=${run.horizon}`];
}

/** A probability as the command line prints it: 3 significant digits, small ones in e-notation. */
function probability(p) {
  if (p === 0 || p === 1) return String(p);
  return p < 1e-3 ? p.toExponential(2) : p.toPrecision(3);
}

/**
 * The run's risk figures (GET /api/runs/:id?risk=true&event=…): quantiles and the worst-5% mean
 * with their intervals, and the probability of each event with Clopper–Pearson and Wilson
 * intervals. A field below adds an event of the user's own (return<0, length>=20, terminal=X).
 */
async function riskTable(id, run) {
  const events = defaultEvents(run);
  const box = el('div', { id: 'risk-box' });
  const message = el('span', { class: 'field-error', id: 'error-event', role: 'alert' });
  const input = el('input', { type: 'text', id: 'risk-event', name: 'event', placeholder: 'return<0', 'aria-label': 'event', size: 18 });
  const form = el('form', { class: 'risk-event' }, el('label', { for: 'risk-event' }, 'Probability of '), input, ' ', el('button', { type: 'submit' }, 'Add event'), ' ', message);
  const draw = async (list) => {
    const query = ['risk=true', ...list.map((e) => `event=${encodeURIComponent(e)}`)].join('&');
    const shown = await api(`/api/runs/${encodeURIComponent(id)}?${query}`);
    const table = riskFigureTable(shown.risk);
    if (table) box.replaceChildren(table, form);
  };
  form.addEventListener('submit', async (event) => {
    event.preventDefault();
    const text = input.value.trim();
    if (!text) return;
    try {
      await draw([...events, text]);
      events.push(text);
      input.value = '';
      message.textContent = '';
    } catch (error) {
      message.textContent = error.message;
    }
  });
  try {
    await draw(events);
  } catch {
    // Terminal or length events this run cannot count (stored before they were recorded): the tail alone.
    try {
      events.length = 0;
      await draw(events);
    } catch {
      return null;
    }
  }
  return box.children.length ? box : null;
}

function riskFigureTable(risk) {
  if (!risk) return null;
  const level = `${+(risk.level * 100).toFixed(2)}%`;
  const bound = (x) => (x === null ? '–' : num(x));
  const rows = risk.quantiles.map((q) => el('tr', {},
    el('th', { scope: 'row' }, `${+(q.p * 100).toFixed(2)}% quantile`),
    el('td', { class: 'number' }, num(q.estimate)),
    el('td', {}, `${bound(q.low)} to ${bound(q.high)} (order statistics, coverage ≥ ${(q.coverage * 100).toFixed(1)}%)`)));
  const t = risk.tail_mean;
  rows.push(el('tr', {},
    el('th', { scope: 'row' }, `mean of the worst ${+(t.tail * 100).toFixed(2)}%`),
    el('td', { class: 'number' }, num(t.estimate)),
    el('td', {}, [t.dkw ? `${num(t.dkw.low)} to ${num(t.dkw.high)} (DKW, distribution-free)` : 'no return bounds: no distribution-free interval', t.bootstrap ? `; ${num(t.bootstrap.low)} to ${num(t.bootstrap.high)} (bootstrap, approximate)` : ''].join(''))));
  for (const e of risk.events) {
    const cp = e.clopper_pearson;
    const w = e.wilson;
    const zero = e.zero_events ? `; never happened: p ≤ ${probability(e.zero_events.upper)} (one-sided)` : '';
    rows.push(el('tr', { class: 'event' },
      el('th', { scope: 'row' }, `P(${e.event})`),
      el('td', { class: 'number' }, `${probability(e.estimate)} (${count(e.count)} of ${count(e.episodes)})`),
      el('td', {}, `${probability(cp.low)} to ${probability(cp.high)} (Clopper–Pearson); ${probability(w.low)} to ${probability(w.high)} (Wilson)${zero}`)));
  }
  return el('table', { class: 'projection', id: 'risk' },
    el('caption', {}, `Risk: the return's tail and event probabilities, ${level} intervals`),
    el('thead', {}, el('tr', {}, el('th', { scope: 'col' }, 'figure'), el('th', { scope: 'col' }, 'value'), el('th', { scope: 'col' }, 'interval'))),
    el('tbody', {}, rows));
}

function projectionTable(run) {
  if (!run.projection?.length) return null;
  return el('table', { class: 'projection', id: 'projection' },
    el('caption', {}, `Episodes for ±ε, and time at this machine's rate (${run.ci.method} interval)`),
    el('thead', {}, el('tr', {}, el('th', { scope: 'col' }, '±ε'), el('th', { scope: 'col' }, 'episodes needed'), el('th', { scope: 'col' }, 'more episodes'), el('th', { scope: 'col' }, 'time'))),
    el('tbody', {}, run.projection.map((row) => el('tr', {},
      el('td', { class: 'number' }, num(row.half_width ?? row.halfWidth, 3)),
      el('td', { class: 'number' }, count(row.episodes_needed ?? row.episodesNeeded)),
      el('td', { class: 'number' }, count(row.more_episodes ?? row.moreEpisodes)),
      el('td', { class: 'number' }, seconds(row.seconds))))));
}

async function plotInto(container, id, kind, query = '') {
  try {
    const spec = await api(`/api/runs/${encodeURIComponent(id)}/plots/${kind}${query}`);
    if (kind === 'value-map') await drawValueMap(container, id, spec, query !== '');
    else await drawPlot(container, spec);
  } catch (error) {
    if (error.status === 404) container.remove();
    else container.replaceChildren(el('p', { class: 'error' }, `Could not draw the ${kind} plot: ${error.message}`));
  }
}

/** The value map, with a checkbox under it that redraws it with the policy's likeliest moves. */
async function drawValueMap(container, id, spec, arrows) {
  const canvas = el('div', { class: 'plot-canvas' });
  const box = el('input', { type: 'checkbox', id: 'arrows-toggle' });
  box.checked = arrows;
  box.addEventListener('change', () => plotInto(container, id, 'value-map', box.checked ? '?arrows=true' : ''));
  container.replaceChildren(canvas, el('label', { class: 'toggle' }, box, " show the policy's likeliest moves"));
  await drawPlot(canvas, spec);
  container.dataset.marks = canvas.dataset.marks;
  container.dataset.rendered = 'true';
  container.dataset.arrows = String(arrows);
}

async function renderRun(id) {
  const run = await api(`/api/runs/${encodeURIComponent(id)}`);
  const live = run.status === 'running' || run.status === 'queued';
  const plots = el('div', { class: 'plots' },
    el('figure', { class: 'plot', id: 'plot-convergence', 'data-kind': 'convergence' }),
    el('figure', { class: 'plot', id: 'plot-histogram', 'data-kind': 'histogram' }),
    el('figure', { class: 'plot', id: 'plot-lengths', 'data-kind': 'lengths' }),
    el('figure', { class: 'plot', id: 'plot-cdf', 'data-kind': 'cdf' }),
    el('figure', { class: 'plot', id: 'plot-value-map', 'data-kind': 'value-map' }));
  const definitions = await api(`/api/runs/${encodeURIComponent(id)}/definitions`).catch(() => null);
  show(
    el('p', { class: 'crumbs' }, el('a', { href: '#/' }, 'Runs'), ' / ', id),
    el('h1', {}, `${run.policy} on ${run.env} `, badge(run.status)),
    annotationsBlock(run),
    live ? el('p', { id: 'live' }, progressLine(run.progress)) : null,
    live ? stopButton(id) : null,
    run.error ? el('p', { class: 'error' }, run.error) : null,
    run.mean !== undefined ? el('div', { class: 'summary' }, figureRows(run), projectionTable(run)) : el('p', {}, live ? 'The figures and plots appear when the run ends.' : 'No figures: fewer than two episodes are stored.'),
    run.episodes >= 2 && !live ? plots : null,
    provenanceBlock(run),
    definitions ? el('details', { class: 'definitions' }, el('summary', {}, 'Definitions and seed'),
      el('p', {}, `seed ${run.seed}; environment hash ${run.env_hash.slice(0, 12)}, policy hash ${run.policy_hash.slice(0, 12)}`),
      el('h3', {}, run.env), el('pre', {}, JSON.stringify(definitions.env, null, 2)),
      el('h3', {}, run.policy), el('pre', {}, JSON.stringify(definitions.policy, null, 2))) : null,
  );
  if (run.episodes >= 2 && !live) {
    const risk = await riskTable(id, run);
    if (risk) plots.before(risk);
    await Promise.all([...plots.children].map((figure) => plotInto(figure, id, figure.dataset.kind)));
  }
  if (live) followRun(id);
}

/** Stops a running or queued run (POST /api/runs/:id/stop); it ends interrupted, resumable. */
function stopButton(id) {
  const message = el('span', { class: 'field-error', role: 'status' });
  const button = el('button', { type: 'button', id: 'stop-run' }, 'Stop this run');
  button.addEventListener('click', async () => {
    button.disabled = true;
    try {
      await api(`/api/runs/${encodeURIComponent(id)}/stop`, { method: 'POST', body: '{}' });
      message.textContent = 'Stopping: the episodes finished so far are kept.';
    } catch (error) {
      message.textContent = error.message;
      button.disabled = false;
    }
  });
  return el('p', {}, button, ' ', message);
}

function progressLine(p) {
  if (!p) return 'waiting in the queue…';
  const mean = p.mean === null || p.mean === undefined ? '' : `, running mean ${num(p.mean)} ± ${num(p.half_width, 2)}`;
  if (p.target_error) return [`${count(p.done)} episodes${mean}, target ±${num(p.target_error, 3)} (at most ${count(p.total)} episodes)`, progressBar(p)];
  return [`${count(p.done)} of ${count(p.total)} episodes${mean}`, progressBar(p)];
}

/** Live progress from the server's event stream; the page redraws when the run ends. */
function followRun(id) {
  const source = new EventSource(eventsUrl(id));
  source.addEventListener('progress', (event) => {
    const p = JSON.parse(event.data);
    const line = document.getElementById('live');
    if (line) line.replaceChildren(...[progressLine(p)].flat().filter(Boolean));
  });
  source.addEventListener('end', () => {
    source.close();
    if (location.hash === `#/runs/${id}`) route();
  });
  onLeave(() => source.close());
}

// ---- comparisons -------------------------------------------------------------------------

async function renderComparison(id) {
  const c = await api(`/api/comparisons/${encodeURIComponent(id)}`);
  const plot = el('figure', { class: 'plot', id: 'plot-differences' });
  if (c.status === 'running' || c.status === 'queued') {
    show(el('p', { class: 'crumbs' }, el('a', { href: '#/' }, 'Runs'), ' / ', id), el('h1', {}, `Comparison on ${c.env} `, badge(c.status)),
      el('p', { id: 'live' }, progressLine(c.progress)), stopButton(id));
    const timer = setTimeout(route, 1000);
    onLeave(() => clearTimeout(timer));
    return;
  }
  if (c.figures_unavailable) {
    show(el('p', { class: 'crumbs' }, el('a', { href: '#/' }, 'Runs'), ' / ', id), el('h1', {}, `Comparison on ${c.env} `, badge(c.status)),
      el('p', { class: 'warning', id: 'comparison-unavailable' }, c.figures_unavailable),
      el('p', {}, 'Each policy\'s own run: ', c.members.map((m) => [el('a', { href: `#/runs/${m}` }, m), ' '])));
    return;
  }
  const names = c.policies.map((p) => p.name);
  const level = `${+(c.level * 100).toFixed(2)}%`;
  const pValue = (p) => (p === null || p === undefined ? '–' : p < 1e-16 ? '< 1e-16' : num(p, 2));
  const holm = c.p_value_adjustment === 'holm';
  const target = c.target_error === null || c.target_error === undefined
    ? null
    : el('p', { id: 'comparison-target' }, c.target_reached
      ? `Target ±${num(c.target_error, 3)} on every difference: reached after ${count(c.episodes)} paired episodes (at most ${count(c.max_episodes)}).`
      : `Target ±${num(c.target_error, 3)} on every difference: not reached within ${count(c.episodes)} paired episodes (at most ${count(c.max_episodes)}).`);
  const withIqm = c.policies.some((p) => p.iqm);
  const withExact = c.policies.some((p) => p.exact_value !== null && p.exact_value !== undefined);
  show(
    el('p', { class: 'crumbs' }, el('a', { href: '#/' }, 'Runs'), ' / ', id),
    el('h1', {}, `Comparison on ${c.env} `, badge(c.status)),
    annotationsBlock(c),
    c.paired === false
      ? el('p', { id: 'unpaired' }, `Stored runs compared as independent samples (Welch intervals): ${c.reasons.join('; ')}.`)
      : el('p', {}, `${count(c.episodes)} episodes per policy, seed ${c.seed}, the same environment noise for every policy (common random numbers), ${noiseWords(c.noise)}.`),
    c.env_change ? el('p', { class: 'warning' }, `Different environments: ${c.env_change.differences.join('; ')}`) : null,
    target,
    (c.warnings ?? []).map((w) => el('p', { class: 'warning' }, w)),
    el('p', {}, 'Each policy\'s own run: ', c.members.map((m, p) => [el('a', { href: `#/runs/${m}` }, names[p] ?? m), ' '])),
    el('h2', {}, 'Policies'),
    el('table', { class: 'figures', id: 'comparison-policies' },
      el('thead', {}, el('tr', {}, ['rank', 'policy', 'mean', `${level} interval`, ...(withExact ? ['exact value (reckon exact)'] : []), 'std', 'mean length', ...(withIqm ? [`IQM (${level} stratified bootstrap)`] : [])].map((h) => el('th', { scope: 'col' }, h)))),
      el('tbody', {}, c.ranking.map((p) => {
        const policy = c.policies[p];
        return el('tr', {},
          el('td', { class: 'number' }, String(policy.rank)),
          el('td', {}, `[${p}] ${names[p]}`),
          el('td', { class: 'number' }, num(policy.mean)),
          el('td', { class: 'number' }, `${num(policy.ci.low)} to ${num(policy.ci.high)} (${policy.ci.method})`),
          withExact ? el('td', { class: 'number' }, policy.exact_value === null ? '–' : `${num(policy.exact_value, 6)}: ${policy.exact_inside ? 'inside' : 'OUTSIDE'}`) : null,
          el('td', { class: 'number' }, num(policy.std)),
          el('td', { class: 'number' }, num(policy.mean_length)),
          withIqm ? el('td', { class: 'number' }, policy.iqm ? `${num(policy.iqm.estimate)} (${num(policy.iqm.low)} to ${num(policy.iqm.high)})` : '–') : null);
      }))),
    plot,
    el('h2', {}, 'Paired differences'),
    el('table', { class: 'figures', id: 'comparison-differences' },
      el('thead', {}, el('tr', {}, ['difference', 'mean', `${level} interval`, 'p-value', ...(holm ? ['Holm-adjusted p'] : []), 'correlation', 'variance reduction by pairing', 'P(first returns more) (interval)'].map((h) => el('th', { scope: 'col' }, h)))),
      el('tbody', {}, c.differences.map((d) => el('tr', {},
        el('td', {}, `[${d.a}] ${names[d.a]} − [${d.b}] ${names[d.b]}`),
        el('td', { class: 'number' }, num(d.mean)),
        el('td', { class: 'number' }, `${num(d.low)} to ${num(d.high)} (${d.method}${d.anytime_valid ? ', valid at any stop' : ''})`),
        el('td', { class: 'number' }, pValue(d.p_value)),
        holm ? el('td', { class: 'number' }, pValue(d.adjusted_p_value)) : null,
        el('td', { class: 'number' }, num(d.correlation, 3)),
        el('td', { class: 'number' }, d.variance_reduction === null ? '–' : `${num(d.variance_reduction, 3)}×`),
        el('td', { class: 'number' }, `${num(d.probability_of_improvement.estimate, 3)} (${num(d.probability_of_improvement.low, 3)} to ${num(d.probability_of_improvement.high, 3)})`))))),
    el('p', {}, 'Variance reduction: how many times more episodes two independent runs would need for the same interval. P(first returns more): the probability that the first policy returns more than the second in the same episode, with its interval.'),
    provenanceBlock(c),
  );
  const groupsPlot = c.groups?.length ? groupSection(c, names) : null;
  await drawPlot(plot, await api(`/api/comparisons/${encodeURIComponent(id)}/plot`));
  if (groupsPlot) await drawPlot(groupsPlot, await api(`/api/comparisons/${encodeURIComponent(id)}/groups-plot`));
}

/**
 * Groups of policies (one a training seed): the members and group means plot, and per group
 * the split of its uncertainty between seeds and episodes as a bar, with what would narrow it.
 * Added after the differences; returns the figure the plot goes into.
 */
function groupSection(c, names) {
  const figure = el('figure', { class: 'plot', id: 'plot-groups' });
  const level = `${Math.round(c.level * 100)}%`;
  const groups = c.groups.map((g) => {
    const seeds = Math.round((1 - g.uncertainty.episode_share) * 100);
    return el('section', { class: 'group', 'data-group': g.name },
      el('h3', {}, `${g.name}: ${g.members.length} members`),
      el('p', {}, `Group mean ${num(g.mean)} (${num(g.ci.low)} to ${num(g.ci.high)}), ${level} t interval over seeds; IQM of members ${num(g.iqm.estimate)}. `,
        `Between seeds σ_b ${num(Math.sqrt(g.variance.between_seeds), 3)}, within a policy σ_w ${num(Math.sqrt(g.variance.within_policy), 3)}, intraclass correlation ${num(g.variance.icc, 3)}, design effect ${num(g.variance.design_effect, 3)}.`),
      el('div', { class: 'split', role: 'img', 'aria-label': `uncertainty: seeds ${seeds}%, episodes ${100 - seeds}%` },
        el('span', { class: 'split-seeds', style: `width: ${seeds}%` }, seeds >= 12 ? `seeds ${seeds}%` : ''),
        el('span', { class: 'split-episodes', style: `width: ${100 - seeds}%` }, 100 - seeds >= 12 ? `episodes ${100 - seeds}%` : '')),
      el('p', { class: 'advice' }, g.advice_text));
  });
  const differences = c.group_differences.length === 0 ? null : el('table', { class: 'figures' },
    el('thead', {}, el('tr', {}, ['groups', 'difference of means', `${level} Welch interval`, 'adjusted p', 'P(member of first is better)'].map((h) => el('th', { scope: 'col' }, h)))),
    el('tbody', {}, c.group_differences.map((d) => el('tr', {},
      el('td', {}, `${c.groups[d.a].name} − ${c.groups[d.b].name}`),
      el('td', { class: 'number' }, num(d.mean)),
      el('td', { class: 'number' }, `${num(d.low)} to ${num(d.high)}`),
      el('td', { class: 'number' }, num(d.adjusted_p_value, 2)),
      el('td', { class: 'number' }, num(d.probability_of_improvement.estimate, 3))))));
  const differencesPlot = document.getElementById('plot-differences');
  differencesPlot.before(el('h2', {}, 'Groups: training methods across seeds'), figure, ...groups, ...(differences ? [differences] : []), el('h2', {}, 'Policy by policy'));
  // With two groups or more the differences plot draws the differences of group means: it goes with them.
  if (differences) differences.after(differencesPlot);
  return figure;
}

// ---- off-policy runs ----------------------------------------------------------------------

/** The weighted doubly robust estimate (else the first) ± its bootstrap half-width. */
function offPolicyHeadline(summary) {
  const chosen = summary?.estimates?.find((e) => e.name === 'wdr') ?? summary?.estimates?.[0];
  if (!chosen || chosen.estimate === null) return 'off-policy';
  const b = chosen.intervals.bootstrap;
  return b && b.low !== null ? `${chosen.name} ${num(chosen.estimate)} ± ${num((b.high - b.low) / 2, 2)}` : `${chosen.name} ${num(chosen.estimate)}`;
}

async function renderOffPolicy(id) {
  const r = await api(`/api/offpolicy/${encodeURIComponent(id)}`);
  const d = r.diagnostics;
  const level = `${Math.round(r.level * 1000) / 10}%`;
  const range = (p) => (p && p.low !== null ? `${num(p.low)} to ${num(p.high)}` : '–');
  const plot = el('figure', { class: 'plot', id: 'plot-weights' });
  show(
    el('p', { class: 'crumbs' }, el('a', { href: '#/' }, 'Runs'), ' / ', id),
    el('h1', {}, `Off-policy estimate of ${r.policy} `, badge(r.status)),
    annotationsBlock(r),
    el('p', {}, `From the log ${r.log.path}: ${count(r.log.episodes)} episodes, ${count(r.log.steps)} steps (sha256 ${r.log.sha256.slice(0, 12)}…), discount ${r.discount}${r.env ? `, environment ${r.env}` : ''}.`),
    d.verdict ? el('p', { class: 'warning', role: 'alert' }, d.verdict) : null,
    d.warnings.map((w) => el('p', { class: 'warning' }, w)),
    el('h2', {}, 'Estimators side by side'),
    el('table', { class: 'figures', id: 'offpolicy-estimates' },
      el('thead', {}, el('tr', {}, ['estimator', 'estimate', `${level} BCa bootstrap`, 'percentile bootstrap', 't'].map((h) => el('th', { scope: 'col' }, h)))),
      el('tbody', {}, r.estimates.map((e) => el('tr', {},
        el('td', {}, `${e.name}: ${e.title}`),
        el('td', { class: 'number' }, e.estimate === null ? 'undefined' : num(e.estimate)),
        el('td', { class: 'number' }, range(e.intervals.bootstrap)),
        el('td', { class: 'number' }, range(e.intervals.bootstrap_percentile)),
        el('td', { class: 'number' }, range(e.intervals.t)))))),
    el('p', {}, 'Bootstrap and t intervals are approximate; their disagreement is itself a warning sign.'),
    el('h2', {}, `Bounds valid at any number of episodes (${level}; lower bounds one-sided)`),
    el('ul', {}, r.bounds.map((b) => el('li', {}, `${b.method === 'betting-lower' ? 'betting, on the weighted returns' : b.method === 'betting' ? 'betting, two-sided (largest weight known)' : 'Thomas et al. (2015), truncated weights'}: ${b.low === null ? `– (${b.note ?? 'not available'})` : b.high === null ? num(b.low) : `${num(b.low)} to ${num(b.high)}`}`))),
    el('h2', {}, 'Weights'),
    el('p', { id: 'offpolicy-ess' }, `Effective sample size (Kish) ${num(d.ess)} of ${count(r.log.episodes)} episodes (${num(100 * d.ess_fraction, 3)}%); largest weight ${num(d.max_weight)}${d.max_weight_share === null ? '' : ` (${num(100 * d.max_weight_share, 3)}% of all weight)`}; mean weight ${num(d.mean_weight)} (${level}: ${range(d.mean_weight_interval)}), which should be 1.`),
    plot,
    el('p', {}, 'These are statistical estimates about the logged system; they are not safety evidence.'),
    provenanceBlock(r),
  );
  await drawPlot(plot, await api(`/api/offpolicy/${encodeURIComponent(id)}/plot`));
}

// ---- new evaluation -----------------------------------------------------------------------

async function renderForm() {
  const examples = await api('/api/examples');
  const environments = examples.filter((e) => e.role === 'environment');
  const policies = examples.filter((e) => e.role === 'policy');
  const messages = {};
  const field = (name, label, control, hint) => {
    messages[name] = el('span', { class: 'field-error', id: `error-${name}`, role: 'alert' });
    return el('div', { class: 'field', 'data-field': name }, el('label', { for: control.id }, label), control, hint ? el('small', {}, hint) : null, messages[name]);
  };
  const definitionPicker = (name, list) => {
    const select = el('select', { id: `${name}-choice` }, list.map((e) => el('option', { value: e.name }, e.name)), el('option', { value: '' }, 'paste my own…'));
    const text = el('textarea', { id: `${name}-json`, rows: 10, spellcheck: 'false' });
    const fill = () => {
      const chosen = list.find((e) => e.name === select.value);
      if (chosen) text.value = JSON.stringify(chosen.definition, null, 2);
    };
    select.addEventListener('change', fill);
    fill();
    return { select, text };
  };
  const env = definitionPicker('env', environments);
  const policy = definitionPicker('policy', policies);
  const policy2 = definitionPicker('policy2', policies);
  const choose = (picker, name) => {
    const found = policies.find((p) => p.name === name);
    if (found) { picker.select.value = found.name; picker.text.value = JSON.stringify(found.definition, null, 2); }
  };
  choose(policy, 'picker-careful.json');
  choose(policy2, 'picker-direct.json');
  // Estimate one policy, or compare it with a second on the same episodes (POST /api/comparisons).
  const mode = el('select', { id: 'mode' }, el('option', { value: 'estimate' }, 'estimate one policy'), el('option', { value: 'compare' }, 'compare two policies'));
  const iqm = el('input', { id: 'iqm', type: 'checkbox' });
  const episodes = el('input', { id: 'episodes', type: 'number', min: 2, value: 10000 });
  const seed = el('input', { id: 'seed', type: 'number', min: 0, placeholder: 'random' });
  const confidence = el('input', { id: 'confidence', type: 'number', step: 'any', value: 0.95 });
  const ci = el('select', { id: 'ci' }, ['t', 'normal', 'bootstrap', 'bootstrap-percentile', 'hoeffding', 'bernstein'].map((m) => el('option', { value: m }, m)));
  const noise = el('select', { id: 'noise' }, ['step', 'visit'].map((m) => el('option', { value: m }, m)));
  const targetError = el('input', { id: 'target_error', type: 'number', step: 'any', min: 0, placeholder: 'none' });
  const submit = el('button', { type: 'submit', id: 'submit' }, 'Start');
  const status = el('p', { id: 'form-status', role: 'status' });
  const second = field('policy2', 'Second policy', policy2.text, el('span', {}, 'bundled: ', policy2.select));
  const iqmField = field('iqm', 'Interquartile mean', iqm, 'also each policy\'s IQM with a stratified bootstrap interval');
  const showMode = () => {
    const comparing = mode.value === 'compare';
    second.hidden = !comparing;
    iqmField.hidden = !comparing;
    submit.textContent = comparing ? 'Compare' : 'Start';
  };
  mode.addEventListener('change', showMode);
  const form = el('form', { id: 'evaluation-form', novalidate: true },
    el('div', { class: 'row' }, field('mode', 'What to run', mode, 'a comparison runs both policies on the same episodes and environment noise')),
    el('div', { class: 'columns' },
      field('env', 'Environment', env.text, el('span', {}, 'bundled: ', env.select)),
      field('policy', 'Policy', policy.text, el('span', {}, 'bundled: ', policy.select)),
      second),
    el('div', { class: 'row' },
      field('episodes', 'Episodes', episodes, 'with a target error: the most to run'),
      field('seed', 'Seed', seed, 'empty: chosen at random and shown'),
      field('confidence', 'Confidence', confidence),
      field('ci', 'Interval', ci),
      field('noise', 'Noise', noise, 'visit: the same draws at the same state visit'),
      field('target_error', 'Target half-width', targetError, 'run until the interval is this narrow'),
      iqmField),
    submit, status);
  showMode();
  form.addEventListener('submit', async (event) => {
    event.preventDefault();
    for (const m of Object.values(messages)) m.textContent = '';
    status.textContent = '';
    const comparing = mode.value === 'compare';
    const parsed = {};
    for (const [name, picker] of [['env', env], ['policy', policy], ...(comparing ? [['policy2', policy2]] : [])]) {
      try {
        parsed[name] = JSON.parse(picker.text.value);
      } catch (error) {
        messages[name].textContent = `not JSON: ${error.message}`;
        return;
      }
    }
    const body = comparing
      ? {
          env: parsed.env,
          env_name: env.select.value || undefined,
          policies: [[policy, parsed.policy], [policy2, parsed.policy2]].map(([picker, definition]) => ({ name: picker.select.value || undefined, definition })),
        }
      : { env: parsed.env, env_name: env.select.value || undefined, policy: parsed.policy, policy_name: policy.select.value || undefined };
    if (comparing && iqm.checked) body.iqm = true;
    const numbers = { episodes, seed, confidence, target_error: targetError };
    for (const [name, input] of Object.entries(numbers)) if (input.value.trim() !== '') body[name] = Number(input.value);
    if (ci.value !== 't') body.ci = ci.value;
    if (noise.value !== 'step') body.noise = noise.value;
    submit.disabled = true;
    try {
      const started = await api(comparing ? '/api/comparisons' : '/api/evaluations', { method: 'POST', body: JSON.stringify(body) });
      location.hash = comparing ? `#/comparisons/${started.id}` : `#/runs/${started.id}`;
    } catch (error) {
      // A comparison's errors name policies[0] and policies[1]: the two policy fields.
      const fieldName = { 'policies[0]': 'policy', 'policies[1]': 'policy2' }[error.field] ?? error.field;
      const where = fieldName && messages[fieldName] ? messages[fieldName] : status;
      where.textContent = error.message;
      status.textContent ||= error.status === 429 ? '' : 'Not started: see the message above.';
    } finally {
      submit.disabled = false;
    }
  });
  show(el('h1', {}, 'Start an evaluation or a comparison'),
    el('p', {}, 'Definitions as in the files (README, "Definition files"); code modules and file paths are not accepted here.'), form);
}

// ---- routing --------------------------------------------------------------------------------

async function route() {
  for (const fn of cleanup.splice(0)) fn();
  const hash = location.hash || '#/';
  try {
    let match;
    if ((match = hash.match(/^#\/runs\/([\w-]+)$/))) await renderRun(match[1]);
    else if ((match = hash.match(/^#\/comparisons\/([\w-]+)$/))) await renderComparison(match[1]);
    else if ((match = hash.match(/^#\/offpolicy\/([\w-]+)$/))) await renderOffPolicy(match[1]);
    else if (hash === '#/new') await renderForm();
    else await renderRunList();
  } catch (error) {
    showError(error);
  }
}

window.addEventListener('hashchange', route);
route();
