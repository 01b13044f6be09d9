// The page: chooses a model, asks the worker to solve it, and wires the
// views, files, share links and the library together.
import { solve, qStep, generate, warmPool, onWorkerRestart, catalogue, readDocument, withLayout } from './compute.js';
import { renderFacts, renderProblems, renderOptimal, renderValues, renderQ } from './views.js';
import { ExperimentView, DEFAULT_SETUP, resultsOf } from './experiment.js';
import { initGeneratorForm } from './generator-form.js';
import { Editor } from './editor.js';
import { GraphView } from './graph.js';
import * as store from './store.js';
import { stamp } from './format.js';
import { download, safeName } from './dom.js';
import * as share from './share.js';

const $ = (id) => document.getElementById(id);
/** The model on screen: {text, solution, name, generator, source}. */
let current = null;
let autosaveBlocked = false;
/** The core's catalogues and limits (src/catalogue.rs), fetched at start. */
let CATALOGUE = null;

function notice(text, warn = false) {
  const n = $('notice');
  n.textContent = text;
  n.classList.toggle('warn', warn);
  n.hidden = !text;
}

function setStatus(text) { $('status').textContent = text; }

// ---- tabs -------------------------------------------------------------
const TABS = ['solution', 'editor', 'graph', 'experiment', 'library'];
function showTab(name) {
  for (const t of TABS) {
    const on = t === name;
    $(`tab-${t}`).setAttribute('aria-selected', String(on));
    $(`tab-${t}`).tabIndex = on ? 0 : -1;
    $(`panel-${t}`).hidden = !on;
  }
  if (name === 'library') renderLibrary();
  if (name === 'experiment') experiment.draw();
  if (name === 'graph') graph.render();
}
for (const t of TABS) {
  $(`tab-${t}`).addEventListener('click', () => showTab(t));
  $(`tab-${t}`).addEventListener('keydown', (e) => {
    const i = TABS.indexOf(t);
    const j = e.key === 'ArrowRight' ? (i + 1) % TABS.length : e.key === 'ArrowLeft' ? (i + TABS.length - 1) % TABS.length : -1;
    if (j >= 0) { showTab(TABS[j]); $(`tab-${TABS[j]}`).focus(); }
  });
}

// ---- the model --------------------------------------------------------
/** `doc` is the model in the core's canonical form (every field explicit). */
function show(sol, text, doc, source, generator = null) {
  current = { text, solution: sol, name: sol.name || 'Untitled model', source, generator };
  experiment?.refreshAlgorithmMenus();
  $('problems').hidden = true;
  renderFacts($('model-facts'), sol);
  renderOptimal($('optimal-value'), sol.optimal_value);
  renderValues($('value-wrap'), sol);
  const step = $('step');
  step.max = String(sol.horizon);
  step.value = '1';
  showStep().catch(fail);
  experiment.setSweepChoices(generator);
  showSource(source);
  editor.load(doc, sol);
  graph.show(doc, sol);
  document.title = `${current.name} — Burnin`;
}

/** The demo selector names the open demo, or says "—" and what is open instead. */
function showSource(source) {
  const select = $('demo-select');
  const other = select.querySelector('option[value=""]');
  if (source.kind === 'demo') {
    select.value = source.name;
    other.textContent = '—';
  } else {
    other.textContent = `— ${source.name} is open`;
    select.value = '';
  }
}

/** Shows Q* and the gaps of the chosen step, fetched from the worker. */
async function showStep() {
  if (!current) return;
  const shown = current;
  const h = Number($('step').value) - 1;
  $('step-shown').textContent = String(h + 1);
  const q = await qStep(h);
  // A newer model or step may have been chosen meanwhile.
  if (current !== shown || Number($('step').value) - 1 !== h) return;
  renderQ($('q-wrap'), current.solution, h, q);
}

// Opening is asynchronous (a fetch, then the worker), so two opens started
// close together could finish in either order: only the latest one started
// may show its model or its problems.
let opens = 0;
/** A ticket for a new open; `ticket()` is true while no newer open has started. */
function claimOpen() {
  const mine = ++opens;
  return () => mine === opens;
}

/**
 * Solves `text`; a bad file shows its problems and leaves the open model as
 * it was. Resolves to true when shown, false for a bad file, and null when a
 * newer open started meanwhile (nothing is shown then).
 */
async function openModel(text, label, source, generator = null, latest = claimOpen()) {
  setStatus(`Solving ${label}…`);
  const t0 = performance.now();
  const result = await solve(text);
  if (!latest()) return null;
  if (!result.ok) {
    renderProblems($('problems'), label, result);
    setStatus(current ? `Still showing “${current.name}”.` : 'No model open.');
    return false;
  }
  const changed = !current || current.text !== text;
  if (changed) $('undo-box').hidden = true;
  show(result, text, JSON.parse(result.canonical), source, generator);
  if (changed) experiment.clearResults();
  setStatus(`Solved ${label} by backward induction in ${Math.max(1, Math.round(performance.now() - t0))} ms.`);
  saveWork();
  return true;
}

async function openDemo(file) {
  const latest = claimOpen();
  const resp = await fetch(`demo-models/${file}`);
  if (!resp.ok) throw new Error(`cannot load demo ${file} (${resp.status})`);
  const text = await resp.text();
  if (!latest()) return null;
  // A demo experiment opens as any experiment file does (model and set-up).
  if (file.startsWith('experiments/')) return openText(text, file.slice('experiments/'.length));
  return openModel(text, file, { kind: 'demo', name: file }, null, latest);
}

// ---- files ------------------------------------------------------------
/** The form's set-up from the core's summary of an experiment file. */
function setupFromSummary(e) {
  return {
    episodes: e.episodes, seeds: e.seeds, seed: e.seed, delta: e.delta,
    learners: e.learners.map((l) => ({ use: true, algorithm: l.algorithm, guest: l.guest ?? undefined, value: l.param, label: l.default_label ? '' : l.label, swept: !e.sweep?.learners || e.sweep.learners.includes(l.label) })),
    decompose: e.decompose, sharedDraws: e.shared_draws,
    sweep: e.sweep ? { parameter: e.sweep.parameter, values: e.sweep.values.join(', ') } : { parameter: '', values: '' },
  };
}

/** Opens a model, experiment or results file, as the core reads it. */
async function openText(text, label) {
  const doc = await readDocument(text);
  if (!doc.ok) { renderProblems($('problems'), label, doc); return; }
  if (doc.kind === 'experiment') {
    const e = doc.experiment;
    if (await openModel(e.model, label, { kind: 'file', name: label }, e.generator)) {
      experiment.applySetup(setupFromSummary(e));
      showTab('experiment');
      saveWork();
    }
    return;
  }
  if (doc.kind === 'results') {
    try {
      experiment.setResults(resultsOf(doc));
      showTab('experiment');
      resultsFileNotice = `Showing results from ${label}.`;
      notice(resultsFileNotice);
    } catch (err) {
      renderProblems($('problems'), label, { problems: [{ path: '', message: `these results cannot be shown (${err.message})` }], unlisted: 0 });
    }
    return;
  }
  await openModel(text, label, { kind: 'file', name: label });
}

async function openFile(file) {
  if (!file) return;
  // The core's own limit, checked before the file is read into memory.
  const limit = CATALOGUE.max_file_bytes;
  if (file.size > limit) { notice(`${file.name} is over the limit of ${limit} bytes and was not opened.`, true); return; }
  await openText(await file.text(), file.name);
}

// ---- saving ------------------------------------------------------------
let saveTimer = 0;
function saveWork() {
  clearTimeout(saveTimer);
  saveTimer = setTimeout(saveNow, 300);
}

/** Writes the autosave at once (also when the page is being left). */
function saveNow() {
  clearTimeout(saveTimer);
  {
    if (!current) return;
    try {
      const r = experiment.results;
      store.autosave({
        model: current.text, source: current.source, generator: current.generator, setup: experiment.setup(),
        results: r && r.experiment ? { text: r.text, csv: r.csv, experiment: r.experiment } : null,
      });
      if (autosaveBlocked) { autosaveBlocked = false; notice(''); }
    } catch (err) {
      autosaveBlocked = true;
      notice(err instanceof store.StorageFull ? `Autosave is paused: ${err.message}` : `Autosave failed: ${err.message}`, true);
    }
  }
}
window.addEventListener('pagehide', saveNow);

function saveToLibrary(item) {
  try {
    const e = store.saveEntry(item);
    $('library-status').textContent = `Saved “${e.name}”.`;
    notice(`Saved “${e.name}” to the library.`);
    renderLibrary();
  } catch (err) {
    notice(err.message, true);
  }
}

function renderLibrary() {
  const { entries, skipped } = store.listEntries();
  const list = $('library-list');
  list.replaceChildren();
  for (const e of entries) {
    const li = document.createElement('li');
    li.dataset.id = e.id;
    const name = document.createElement('span');
    name.className = 'entry-name';
    name.textContent = e.name;
    const meta = document.createElement('span');
    meta.className = 'entry-meta';
    meta.textContent = `${e.kind === 'experiment' ? 'experiment with results' : 'model'} · ${stamp(e.saved_at)}`;
    const btn = (text, fn, cls) => {
      const b = document.createElement('button');
      b.type = 'button';
      b.textContent = text;
      b.setAttribute('aria-label', `${text} ${e.name}`);
      if (cls) b.className = cls;
      b.addEventListener('click', fn);
      return b;
    };
    li.append(name, meta,
      btn('Open', () => openEntry(e.id)),
      btn('Rename', () => startRename(li, e)),
      btn('Duplicate', () => { store.duplicateEntry(e.id); renderLibrary(); }),
      btn('Delete', () => confirmDelete(e), 'danger'));
    list.append(li);
  }
  const parts = [];
  if (!entries.length) parts.push('Nothing saved yet.');
  if (skipped.length) parts.push(`${skipped.length} stored item${skipped.length === 1 ? ' is' : 's are'} damaged and not listed (${skipped.map((s) => s.reason).join('; ')}); they were left untouched.`);
  $('library-status').textContent = parts.join(' ');
}

function startRename(li, e) {
  const input = document.createElement('input');
  input.type = 'text';
  input.value = e.name;
  input.setAttribute('aria-label', `new name for ${e.name}`);
  const ok = document.createElement('button');
  ok.type = 'button';
  ok.textContent = 'Save name';
  const done = () => { if (input.value.trim()) store.renameEntry(e.id, input.value.trim()); renderLibrary(); };
  ok.addEventListener('click', done);
  input.addEventListener('keydown', (ev) => { if (ev.key === 'Enter') done(); if (ev.key === 'Escape') renderLibrary(); });
  li.replaceChildren(input, ok);
  input.focus();
}

function confirmDelete(e) {
  const d = $('confirm-dialog');
  $('confirm-text').textContent = `Delete “${e.name}” from the library? This cannot be undone.`;
  d.returnValue = '';
  d.onclose = () => { if (d.returnValue === 'ok') { store.deleteEntry(e.id); renderLibrary(); } };
  d.showModal();
}

async function openEntry(id) {
  const e = store.getEntry(id);
  if (!e) { renderLibrary(); return; }
  if (await openModel(e.model, e.name, { kind: 'library', name: e.name })) {
    if (e.experiment) {
      const doc = await readDocument(e.experiment);
      if (doc.ok && doc.kind === 'experiment') experiment.applySetup(setupFromSummary(doc.experiment));
    }
    const results = e.results ? await readDocument(e.results) : null;
    if (results?.ok && results.kind === 'results') { experiment.setResults(resultsOf(results, e.experiment)); showTab('experiment'); } else showTab('solution');
    saveWork();
  }
}

// ---- share links -------------------------------------------------------
async function copyShareLink() {
  if (!current) return;
  try {
    const frag = await share.encode({ model: current.text, setup: experiment.setup() });
    const url = `${location.origin}${location.pathname}${location.search}#${frag}`;
    // The link is shown and copied, never written into this tab's address:
    // a reload must reopen your latest work, not the model as it was shared.
    $('share-url').value = url;
    $('share-box').hidden = false;
    let copied = true;
    try { await navigator.clipboard.writeText(url); } catch { copied = false; }
    $('share-said').textContent = copied
      ? 'copied; it carries the model and the experiment set-up (never code) in the address itself.'
      : 'the clipboard was not available: select the link and copy it.';
    notice('');
  } catch (err) {
    notice(err.message, true);
  }
}

/** Takes a share link out of the address once it is opened (or refused), so a reload reopens the autosave. */
function cleanAddress() {
  if (location.hash) history.replaceState(null, '', `${location.pathname}${location.search}`);
}

/**
 * Whether opening something else may clear the results on screen: yes when
 * there are none, or they are saved; otherwise the user is asked.
 */
function mayReplaceResults() {
  if (!experiment?.results || experiment.resultsKept) return Promise.resolve(true);
  const d = $('replace-results');
  return new Promise((resolve) => {
    const done = (v) => { d.close(); resolve(v); };
    $('replace-results-open').onclick = () => done(true);
    $('replace-results-keep').onclick = () => done(false);
    d.oncancel = () => resolve(false);
    d.showModal();
  });
}

async function openShared(hash) {
  try {
    const p = await share.decode(hash);
    cleanAddress();
    if (!p || typeof p.model !== 'string') throw new Error('the link holds no model');
    const shown = await openModel(p.model, 'the shared link', { kind: 'link', name: 'shared link' });
    if (shown) {
      if (p.setup) experiment.applySetup(p.setup);
      notice('Opened the model from a share link.');
    }
    if (shown !== false) return shown;
  } catch (err) {
    cleanAddress();
    notice(`This share link could not be opened: ${err.message}.`, true);
  }
  return false;
}

// ---- editor and graph ---------------------------------------------------
const editor = new Editor(async (text) => {
  const before = current && { text: current.text, name: current.name, source: current.source, generator: current.generator };
  const ok = await openModel(text, 'the edited model', { kind: 'edited', name: `${current?.name || 'model'} (edited)` });
  if (!ok) return;
  showTab('solution');
  if (before) {
    // "Use this model" can be taken back: the model before the edits reopens.
    $('undo-use').textContent = `Undo: reopen “${before.name}” as it was`;
    $('undo-use').onclick = async () => {
      if (await openModel(before.text, before.name, before.source, before.generator)) notice(`Reopened “${before.name}” as it was before your edits.`);
    };
    $('undo-box').hidden = false;
  }
});
const graph = new GraphView(async (positions) => {
  if (!current) return;
  const shown = current;
  const text = await withLayout(shown.text, positions);
  // Another model may have been opened meanwhile; a refused layout changes nothing.
  if (current !== shown || typeof text !== 'string') return;
  current.text = text;
  saveWork();
});

// ---- start -------------------------------------------------------------
onWorkerRestart((why) => notice(`A compute worker stopped (${why}) and was replaced; anything it was running has to be run again.`, true));
let experiment = null;
/** The notice that says which file the shown results came from, while it stands. */
let resultsFileNotice = null;

const experimentHooks = {
  /** New results replaced the shown ones: a notice naming an opened results file no longer holds. */
  resultsReplaced: () => {
    if (resultsFileNotice !== null && $('notice').textContent === resultsFileNotice) notice('');
    resultsFileNotice = null;
  },
  model: () => ({ text: current?.text, name: current?.name || 'model', generator: current?.generator, states: current?.solution.states, sizes: current ? { S: current.solution.states.length, H: current.solution.horizon } : null }),
  changed: saveWork,
  saveResults: (expText, resultsText) => saveToLibrary({ kind: 'experiment', name: `${current.name} — ${stamp(new Date().toISOString())}`, model: current.text, experiment: expText, results: resultsText }),
};

async function start() {
  CATALOGUE = await catalogue();
  $('build-id').textContent = `Burnin ${CATALOGUE.build}`;
  graph.palette = CATALOGUE.palette;
  experiment = new ExperimentView(experimentHooks, CATALOGUE);
  $('optimal-value-term').title = experiment.meaning('optimal_value');
  const index = await (await fetch('demo-models/index.json')).json();
  const select = $('demo-select');
  const other = document.createElement('option');
  other.value = '';
  other.textContent = '—';
  other.disabled = true;
  select.append(other);
  for (const f of index.models) {
    const o = document.createElement('option');
    o.value = f;
    o.textContent = f.replace(/\.json$/, '').replace(/-/g, ' ');
    select.append(o);
  }
  const group = document.createElement('optgroup');
  group.label = 'Demo experiments';
  for (const f of index.experiments || []) {
    const o = document.createElement('option');
    o.value = `experiments/${f}`;
    o.textContent = `${f.replace(/\.json$/, '').replace(/-/g, ' ')} (experiment)`;
    group.append(o);
  }
  if (group.children.length) select.append(group);
  select.value = index.default;
  let shownDemo = select.value;
  select.addEventListener('change', async () => {
    if (!(await mayReplaceResults())) { select.value = shownDemo; return; }
    shownDemo = select.value;
    openDemo(select.value).catch(fail);
  });
  const genSpec = initGeneratorForm($('gen-kind'), $('gen-params'), CATALOGUE.generators);
  $('gen-run').addEventListener('click', async () => {
    const spec = genSpec();
    const r = await generate(spec);
    if (typeof r === 'string') await openModel(r, `generated ${spec.kind} model`, { kind: 'generated', name: spec.kind }, spec);
    else renderProblems($('problems'), `The ${spec.kind} generator`, r);
  });
  $('open-file').addEventListener('click', () => $('file-input').click());
  $('file-input').addEventListener('change', async (e) => {
    const f = e.target.files[0];
    e.target.value = '';
    if (await mayReplaceResults()) openFile(f).catch(fail);
  });
  $('save-model').addEventListener('click', () => current && download(`${safeName(current.name, 'model')}.json`, current.text));
  $('share-link').addEventListener('click', () => copyShareLink().catch(fail));
  $('save-current').addEventListener('click', () => current && saveToLibrary({ kind: 'model', name: current.name, model: current.text }));
  $('step').addEventListener('input', () => showStep().catch(fail));
  document.addEventListener('dragover', (e) => { e.preventDefault(); document.body.classList.add('dropping'); });
  document.addEventListener('dragleave', () => document.body.classList.remove('dropping'));
  document.addEventListener('drop', (e) => {
    e.preventDefault();
    document.body.classList.remove('dropping');
    const f = e.dataTransfer.files[0];
    // A learner module dropped anywhere is a learner to add, not a model.
    if (f && /\.m?js$/i.test(f.name)) experiment.loadGuestFile(f).catch(fail);
    else mayReplaceResults().then((ok) => ok && openFile(f)).catch(fail);
  });
  // The library changed in another tab: show it as it is now.
  window.addEventListener('storage', (e) => {
    if (store.isEntryKey(e.key)) {
      renderLibrary();
      notice('The library was changed in another tab; the list shows it as it is now.');
    }
  });
  window.addEventListener('hashchange', async () => {
    const h = location.hash.slice(1);
    if (!share.isShare(h)) return;
    if (await mayReplaceResults()) openShared(h);
    else cleanAddress();
  });

  // Each step falls through only when its model could not be shown; when the
  // person opened something else meanwhile (null), that stays.
  const hash = location.hash.slice(1);
  if (share.isShare(hash)) {
    const shown = await openShared(hash);
    if (shown !== false) return;
  }
  const saved = store.loadAutosave();
  if (saved) {
    const shown = await openModel(saved.model, saved.source?.name || 'your last model', saved.source || { kind: 'file', name: 'autosave' }, saved.generator || null);
    if (shown) {
      experiment.applySetup(saved.setup);
      if (saved.results) {
        // The CSVs are the core's to write: read the saved results again.
        const doc = await readDocument(saved.results.text);
        if (doc.ok && doc.kind === 'results') experiment.setResults(resultsOf(doc, saved.results.experiment));
      }
    }
    if (shown !== false) return;
  }
  experiment.applySetup(DEFAULT_SETUP);
  await openDemo(index.default);
}

function fail(err) {
  setStatus(`Something went wrong: ${err.message}`);
  console.error(err);
}

// ---- a published build: offline, and told of newer builds --------------
/**
 * In a folder written by `cargo xtask dist` (it marks index.html with
 * <meta name="burnin-dist">), registers the service worker that keeps the
 * build for offline use. A newer published build is offered, never swapped
 * in: the reload waits until no experiment runs.
 */
async function keepOffline() {
  if (!document.querySelector('meta[name="burnin-dist"]') || !('serviceWorker' in navigator)) return;
  const reg = await navigator.serviceWorker.register('sw.js');
  const offer = (waiting) => {
    $('update-bar').hidden = false;
    $('update-reload').onclick = () => {
      if (experiment?.running || experiment?.estimating) {
        $('update-text').textContent = 'A newer version of Burnin is available; it loads when you reload after the run has finished or been cancelled.';
        return;
      }
      navigator.serviceWorker.addEventListener('controllerchange', () => location.reload(), { once: true });
      waiting.postMessage('take-over');
    };
  };
  if (reg.waiting && navigator.serviceWorker.controller) offer(reg.waiting);
  reg.addEventListener('updatefound', () => {
    const w = reg.installing;
    w?.addEventListener('statechange', () => {
      if (w.state === 'installed' && navigator.serviceWorker.controller) offer(w);
    });
  });
  // Look for a newer build when the page comes back into view.
  document.addEventListener('visibilitychange', () => { if (!document.hidden) reg.update().catch(() => {}); });
}

start().catch(fail).finally(() => {
  keepOffline().catch((err) => console.warn(`offline copy not kept: ${err.message}`));
  // Start the experiment workers once the page has settled, so that a first
  // run does not pay for creating them.
  const later = window.requestIdleCallback || ((f) => setTimeout(f, 200));
  later(() => warmPool().catch(fail));
});
