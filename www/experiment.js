// The experiment view: set-up form, running in the worker with progress and
// cancel, and the results (charts with hover, table, visit heat map, exports,
// presentation view).
import { runExperiment, checkGuest, checkExperiment, estimateRun, freshSeed } from './compute.js';
import * as store from './store.js';
import { timeLeft } from './eta.js';
import { el, download, safeName, definitionButton, closeDefinition } from './dom.js';
import { initGuide, offerGuide } from './guide.js';
import { openChart, drawInto, EXPORT } from './charts.js';
import { short, grouped, valueColour, inkOn } from './format.js';
import { sweepableParams } from './generator-form.js';

/** The page's budget (seconds): a run the core's runner estimates over it is started only when the user says so. */
const LONG_RUN_SECONDS = 180;

/** The ready experiment of a first visit: a few seconds in the browser. */
export const DEFAULT_SETUP = {
  episodes: 3000, seeds: 8, seed: 1, delta: 0.05, decompose: true,
  learners: [
    { use: true, algorithm: 'mvp', value: 1, label: 'MVP, theory constants' },
    { use: true, algorithm: 'mvp', value: 0.002, label: 'MVP ×0.002' },
    { use: true, algorithm: 'ucbvi-bernstein', value: 0.05, label: '' },
    { use: true, algorithm: 'q-ucb-hoeffding', value: 0.05, label: '' },
    { use: true, algorithm: 'psrl', value: 1, label: '' },
    { use: true, algorithm: 'eps-greedy', value: 0.1, label: '' },
    { use: true, algorithm: 'uniform', value: null, label: '' },
  ],
  sweep: { parameter: '', values: '' },
};

const $ = (id) => document.getElementById(id);

/**
 * Results as the view keeps them, from the core's reading of a results
 * file or a merge ({json, csv, cellsCsv, summaryCsv, seedsCsv, chartText,
 * readings, tables}: `readings[point][learner]` holds the core's texts of the slope
 * and the burn-in, as the CLI prints them; `tables` the comparison table in
 * every format the core writes, [{key, name, extension, media_type, text}],
 * as `burnin table` writes it), with the experiment file that made them (or null).
 */
export const resultsOf = (doc, experiment = null) => ({
  text: doc.json, csv: doc.csv, cellsCsv: doc.cellsCsv, summaryCsv: doc.summaryCsv, seedsCsv: doc.seedsCsv, chartText: doc.chartText, readings: doc.readings, scaling: doc.scaling, tables: doc.tables || [], experiment,
});

/** Why results opened from a results file cannot go to the library. */
const SAVE_WHY_NOT = 'Not in the library: a results file does not hold the experiment that made it, and a library entry keeps both. Keep the file itself (Results JSON), or open the experiment and run it.';

/** Resolves in a later task (after the browser has had its turn). */
const nextTask = () => new Promise((resolve) => setTimeout(resolve, 0));

/** Whether results (or sweep results) ran one seed per learner. */
const oneSeed = (d) => (d.format === 'burnin-sweep' ? d.points[0].seeds : d.seeds) < 2;

/** A 95% interval as shown, or "n/a (one seed)" where there is none. */
const interval = (d, lo, hi) => (oneSeed(d) ? 'n/a (one seed)' : `[${short(lo)}, ${short(hi)}]`);


export class ExperimentView {
  /**
   * hooks: {model() → {text, name, generator}, changed(), saveResults(experimentText, resultsJson)};
   * catalogue: the core's catalogues (src/catalogue.rs), whose algorithms
   * the learner table offers.
   */
  constructor(hooks, catalogue) {
    this.hooks = hooks;
    this.catalogue = catalogue;
    /** key → the catalogue's algorithm entry. */
    this.algorithms = new Map(catalogue.algorithms.map((a) => [a.key, a]));
    this.results = null;
    this.running = null;
    this.chart = null;
    this.rows = $('learner-rows');
    $('add-learner').addEventListener('click', () => { this.addRow({ use: true, algorithm: 'mvp', value: 1, label: '' }); hooks.changed(); this.noteScaled(); });
    // A fresh seed goes into the form, so the experiment saved, shared or
    // run carries it and its results can be computed again.
    $('new-seed').addEventListener('click', async () => {
      $('exp-seed').value = String(await freshSeed());
      hooks.changed();
      this.recheckSoon();
    });
    /** The user's learners loaded in this page: name → {source, file}. Never saved unless kept. */
    this.guests = new Map();
    $('add-guest').addEventListener('click', () => this.showGuestContract());
    $('guest-add-choose').addEventListener('click', () => { $('guest-add').close(); $('guest-file').click(); });
    $('guest-add-close').addEventListener('click', () => $('guest-add').close());
    $('guest-file').addEventListener('change', (e) => { const f = e.target.files[0]; e.target.value = ''; if (f) this.loadGuestFile(f); });
    const drop = $('guest-drop');
    drop.addEventListener('dragover', (e) => { e.preventDefault(); e.stopPropagation(); drop.classList.add('over'); });
    drop.addEventListener('dragleave', () => drop.classList.remove('over'));
    drop.addEventListener('drop', (e) => {
      e.preventDefault();
      e.stopPropagation();
      drop.classList.remove('over');
      document.body.classList.remove('dropping');
      const f = e.dataTransfer.files[0];
      if (f) this.loadGuestFile(f);
    });
    $('guest-code-cancel').addEventListener('click', () => $('guest-code').close());
    this.renderGuests();
    $('exp-form').addEventListener('submit', (e) => { e.preventDefault(); this.run(); });
    $('exp-form').addEventListener('input', () => { hooks.changed(); this.recheckSoon(); this.noteScaled(); });
    $('exp-form').addEventListener('change', () => this.noteScaled());
    $('exp-form').addEventListener('change', () => this.recheckSoon());
    $('sweep-param').addEventListener('change', () => this.syncSweepPicks());
    $('cancel-exp').addEventListener('click', () => {
      if (!this.running) return;
      this.cancelAt = performance.now();
      this.running.cancel();
    });
    for (const id of ['chart-view', 'show-bands', 'show-lower', 'show-bounds']) $(id).addEventListener('change', () => this.draw());
    for (const r of document.querySelectorAll('input[name=axes]')) r.addEventListener('change', () => this.draw());
    $('heat-learner').addEventListener('change', () => this.drawHeat());
    for (const id of ['cmp-a', 'cmp-b']) $(id).addEventListener('change', () => { this.showComparison(); if ($('chart-view').value === 'difference') this.draw(); if ($('heat-view').value === 'regret-diff') this.drawHeat(); });
    $('export-png').addEventListener('click', () => this.exportPng());
    $('export-svg').addEventListener('click', () => this.exportSvg());
    $('export-json').addEventListener('click', () => download(`${this.fileBase()}-results.json`, this.results.text, 'application/json'));
    $('export-csv').addEventListener('click', () => download(`${this.fileBase()}-results.csv`, this.results.csv, 'text/csv'));
    $('export-cells').addEventListener('click', () => download(`${this.fileBase()}-regret-by-cell.csv`, this.results.cellsCsv, 'text/csv'));
    $('export-summary').addEventListener('click', () => download(`${this.fileBase()}-summary.csv`, this.results.summaryCsv, 'text/csv'));
    $('export-seeds').addEventListener('click', () => download(`${this.fileBase()}-per-seed.csv`, this.results.seedsCsv, 'text/csv'));
    $('export-table').addEventListener('click', () => {
      const t = this.results.tables.find((x) => x.key === $('table-format').value);
      if (t) download(`${this.fileBase()}-table.${t.extension}`, t.text, t.media_type);
    });
    $('heat-view').addEventListener('change', () => this.drawHeat());
    $('save-results').addEventListener('click', () => { hooks.saveResults(this.results.experiment, this.results.text); this.resultsKept = true; });
    for (const id of ['export-json', 'export-csv', 'export-cells', 'export-summary', 'export-seeds', 'export-table']) $(id).addEventListener('click', () => { this.resultsKept = true; });
    $('present').addEventListener('click', () => this.present());
    $('present-close').addEventListener('click', () => this.closePresent());
    document.addEventListener('keydown', (e) => { if (e.key === 'Escape' && !$('presenter').hidden) this.closePresent(); });
    $('present-caption').addEventListener('input', () => { this.presentCaption = $('present-caption').value; this.drawPresent(); });
    // The caption is one paragraph: Enter does not start a new line.
    $('present-caption').addEventListener('keydown', (e) => { if (e.key === 'Enter') e.preventDefault(); });
    window.addEventListener('resize', () => { this.draw(); if (!$('presenter').hidden) this.drawPresent(); });
    const canvas = $('chart');
    canvas.addEventListener('mousemove', (e) => this.hover(e));
    canvas.addEventListener('mouseleave', () => { $('chart-tip').hidden = true; });
    this.setSweepChoices(null);
    initGuide((key) => this.terms(key));
  }

  /** The core's definition of a number shown (src/catalogue.rs, GLOSSARY). */
  meaning(key) { return this.catalogue.glossary.find((t) => t.key === key)?.meaning || ''; }

  /** The core's glossary entries of `keys`, in that order. */
  terms(...keys) { return keys.map((k) => this.catalogue.glossary.find((t) => t.key === k)).filter(Boolean); }

  /**
   * A header cell named `text` with a "?" that opens the core's definitions
   * of `keys` (also its hover title); `what` names the column for a screen reader.
   */
  header(text, keys, what = `“${text}”`) {
    const th = el('th', text, { title: keys.map((k) => this.meaning(k)).join(' '), scope: 'col' });
    th.append(definitionButton(what, this.terms(...keys)));
    return th;
  }

  /** The glossary under the results: every number the page shows, defined once in the core. */
  renderGlossary() {
    const dl = $('glossary-list');
    if (dl.children.length) return;
    for (const t of this.catalogue.glossary) dl.append(el('dt', t.name), el('dd', t.meaning));
  }

  fileBase() { return safeName(this.results?.data?.name || this.results?.data?.model_name || this.hooks.model().name); }

  /**
   * Sweep parameters on offer: δ, the learners' parameters, and for a
   * generated model every numeric parameter of its generator (named as the
   * core names them: `generator.NAME` where a learner parameter has the name).
   */
  setSweepChoices(generator) {
    const sel = $('sweep-param');
    const keep = sel.value;
    sel.replaceChildren(el('option', 'nothing', { value: '' }));
    const learnerKeys = this.catalogue.sweep_keys;
    for (const k of learnerKeys) {
      const p = this.catalogue.algorithms.find((a) => a.param?.key === k)?.param;
      sel.append(el('option', p ? `${p.name} (learners)` : k, { value: k }));
    }
    for (const p of sweepableParams(this.catalogue.generators, generator)) {
      const key = learnerKeys.includes(p.name) ? `generator.${p.name}` : p.name;
      sel.append(el('option', `${p.name.replace(/_/g, ' ')} (generator)`, { value: key, title: p.help }));
    }
    sel.value = [...sel.options].some((o) => o.value === keep) ? keep : '';
  }

  addRow(l) {
    const tr = el('tr');
    const use = el('input', null, { type: 'checkbox', 'aria-label': 'use this learner' });
    use.checked = l.use !== false;
    const alg = el('select', null, { 'aria-label': 'algorithm' });
    this.fillAlgorithms(alg, l.guest ? `guest:${l.guest}` : l.algorithm);
    const param = el('input', null, { type: 'number', step: 'any', min: '0' });
    const paramName = el('span', null, { class: 'param-name' });
    const label = el('input', null, { type: 'text', 'aria-label': 'label', placeholder: 'default label' });
    label.value = l.label || '';
    const remove = el('button', '✕', { type: 'button', 'aria-label': 'remove this learner' });
    const syncParam = (value) => {
      const p = this.algorithms.get(alg.value)?.param;
      param.disabled = !p;
      param.hidden = !p;
      paramName.textContent = p ? p.name : 'no parameter';
      param.setAttribute('aria-label', p ? p.name : 'no parameter');
      param.value = p ? String(value ?? p.default) : '';
      param.title = p ? `${p.name}: ${p.help}` : '';
    };
    syncParam(l.value);
    // A label follows its row: a label the row came with is dropped (for the
    // default one, which names the algorithm and its parameter) when the
    // algorithm or the parameter changes; one the user typed here is kept
    // and flagged, since it may no longer say what the row runs.
    label.addEventListener('input', () => { label.dataset.typed = 'true'; label.classList.remove('stale'); label.removeAttribute('title'); });
    const rowChanged = () => {
      if (!label.value) return;
      if (label.dataset.typed === 'true') {
        label.classList.add('stale');
        label.title = 'You typed this label; check that it still describes the algorithm and parameter (clear it for the default one).';
      } else {
        label.value = '';
      }
    };
    alg.addEventListener('change', () => { syncParam(null); rowChanged(); });
    param.addEventListener('input', rowChanged);
    remove.addEventListener('click', () => { tr.remove(); this.hooks.changed(); this.noteScaled(); });
    const td = (c) => { const t = el('td'); t.append(c); return t; };
    const paramCell = td(paramName);
    paramCell.append(param);
    paramCell.classList.add('param-cell');
    // Whether a sweep over this row's parameter applies to it (shown only
    // when the sweep varies a parameter the row's algorithm takes).
    const pick = el('label', null, { class: 'sweep-pick' });
    const picked = el('input', null, { type: 'checkbox', class: 'swept' });
    picked.checked = l.swept !== false;
    pick.append(picked, ' swept');
    const labelCell = td(label);
    labelCell.append(pick);
    alg.addEventListener('change', () => this.syncSweepPicks());
    tr.append(td(use), td(alg), paramCell, labelCell, td(remove));
    this.rows.append(tr);
    this.syncSweepPicks();
  }

  /** Fills an algorithm menu: the catalogue's algorithms, then the user's learners; selects `value`. */
  fillAlgorithms(sel, value) {
    sel.replaceChildren();
    const sizes = this.hooks.model().sizes;
    const bandit = sizes && sizes.S === 1 && sizes.H === 1;
    for (const a of this.catalogue.algorithms) {
      const o = el('option', a.name, { value: a.key, title: a.reference });
      if (a.bandit_only && sizes && !bandit) {
        o.disabled = true;
        o.textContent = `${a.name} (bandits only: S = 1, H = 1)`;
      }
      sel.append(o);
    }
    const names = new Set(this.guests.keys());
    if (value?.startsWith('guest:')) names.add(value.slice(6));
    if (names.size) {
      const group = el('optgroup', null, { label: 'Your learners' });
      for (const n of [...names].sort()) {
        group.append(el('option', this.guests.has(n) ? `${n} (yours)` : `${n} (yours, not loaded)`, { value: `guest:${n}` }));
      }
      sel.append(group);
    }
    sel.value = value;
  }

  /** Rebuilds every row's algorithm menu, keeping each row's choice. */
  refreshAlgorithmMenus() {
    for (const sel of this.rows.querySelectorAll('select')) this.fillAlgorithms(sel, sel.value);
  }

  /** The "Add your learner…" dialog: the contract's first call and the smallest module, read from the file it offers. */
  async showGuestContract() {
    const code = $('guest-add-code');
    $('guest-add').showModal();
    if (code.textContent) return;
    try {
      const r = await fetch($('guest-add-download').href);
      if (!r.ok) throw new Error(`HTTP ${r.status}`);
      code.textContent = await r.text();
    } catch (err) {
      code.textContent = `examples/smallest.mjs could not be read (${err.message}); docs/formats.md, "Guest learners", shows it.`;
    }
  }

  /** The name a learner file gives: its base name, in the letters a name may use. */
  static guestName(fileName) {
    const base = fileName.replace(/\.(m?js)$/i, '').replace(/[^A-Za-z0-9_.-]+/g, '-').replace(/^-+|-+$/g, '');
    return (base || 'my-learner').slice(0, 64);
  }

  /** Loads a learner module the user chose (file input or drop): checked in a throwaway worker first. */
  async loadGuestFile(f) {
    const status = $('guest-status');
    if (!/\.(m?js)$/i.test(f.name)) { status.textContent = `${f.name} is not a JavaScript module (.js or .mjs); nothing was loaded.`; return; }
    if (f.size > store.MAX_GUEST_SOURCE) { status.textContent = `${f.name} is larger than ${store.MAX_GUEST_SOURCE >> 10} KiB; nothing was loaded.`; return; }
    const source = await f.text();
    await this.addGuest(ExperimentView.guestName(f.name), f.name, source, true);
  }

  /** Adds a checked learner under `name`; with `addRow`, also a row that uses it. */
  async addGuest(name, file, source, addRow) {
    const status = $('guest-status');
    status.textContent = `Checking ${file} in a worker…`;
    let check;
    try { check = await checkGuest(source); } catch (err) { check = { ok: false, message: err.message }; }
    if (!check.ok) { status.textContent = `${file} was not loaded: ${check.message}`; return false; }
    const had = this.guests.has(name);
    this.guests.set(name, { source, file });
    if (addRow && !had && ![...this.rows.querySelectorAll('select')].some((s) => s.value === `guest:${name}`)) {
      this.addRow({ use: true, guest: name, label: '' });
    }
    this.refreshAlgorithmMenus();
    this.renderGuests();
    this.recheckSoon();
    status.textContent = had ? `${file} replaced your learner "${name}".` : `Your learner "${name}" is loaded from ${file}; it runs only in the page's workers.`;
    this.hooks.changed();
    return true;
  }

  /** The list of loaded and kept learners, with their actions. */
  renderGuests() {
    const list = $('guest-list');
    list.replaceChildren();
    const kept = new Map(store.keptGuests().map((k) => [k.name, k]));
    for (const [name, g] of this.guests) {
      const keep = el('button', kept.has(name) && kept.get(name).source === g.source ? 'Kept in this browser' : 'Keep in this browser', { type: 'button' });
      keep.disabled = kept.has(name) && kept.get(name).source === g.source;
      keep.addEventListener('click', () => {
        try { store.keepGuest(name, g.file, g.source); $('guest-status').textContent = `A copy of "${name}" is kept in this browser; it will be shown to you before it runs again.`; } catch (err) { $('guest-status').textContent = err.message; }
        this.renderGuests();
      });
      const unload = el('button', 'Unload', { type: 'button' });
      unload.addEventListener('click', () => { this.guests.delete(name); this.refreshAlgorithmMenus(); this.renderGuests(); });
      { const li = el('li'); li.append(el('strong', name), ` — loaded from ${g.file} (${(g.source.length / 1024).toFixed(1)} KiB) `, keep, ' ', unload); list.append(li); }
    }
    for (const [name, k] of kept) {
      if (this.guests.has(name)) continue;
      const use = el('button', 'Show code and use…', { type: 'button' });
      use.addEventListener('click', () => this.showKept(k));
      const forget = el('button', 'Forget', { type: 'button' });
      forget.addEventListener('click', () => { store.forgetGuest(name); this.renderGuests(); });
      { const li = el('li'); li.append(el('strong', name), ` — kept in this browser from ${k.file} `, use, ' ', forget); list.append(li); }
    }
  }

  /** Shows a kept learner's code; it is loaded only if the user says so. */
  showKept(k) {
    $('guest-code-title').textContent = `Your learner "${k.name}" (${k.file})`;
    $('guest-code-text').textContent = k.source;
    const dialog = $('guest-code');
    $('guest-code-use').onclick = async () => { dialog.close(); await this.addGuest(k.name, k.file, k.source, false); };
    dialog.showModal();
  }

  /** Shows each row's "swept" choice where the sweep varies a parameter its algorithm takes. */
  syncSweepPicks() {
    const key = $('sweep-param').value;
    for (const tr of this.rows.children) {
      const alg = tr.querySelector('select').value;
      tr.querySelector('.sweep-pick').hidden = !key || this.algorithms.get(alg)?.param?.key !== key;
    }
  }

  /** The form as a plain object (autosave, share links). */
  setup() {
    return {
      episodes: Number($('exp-episodes').value), seeds: Number($('exp-seeds').value),
      seed: Number($('exp-seed').value), delta: Number($('exp-delta').value),
      decompose: $('exp-decompose').checked,
      sharedDraws: $('exp-shared').checked,
      learners: [...this.rows.children].map((tr) => {
        const [use, alg, param, label] = tr.querySelectorAll('input, select');
        if (alg.value.startsWith('guest:')) return { use: use.checked, guest: alg.value.slice(6), value: null, label: label.value };
        return { use: use.checked, algorithm: alg.value, value: param.disabled ? null : Number(param.value), label: label.value, swept: tr.querySelector('.swept').checked };
      }),
      sweep: { parameter: $('sweep-param').value, values: $('sweep-values').value },
    };
  }

  applySetup(s) {
    const d = { ...DEFAULT_SETUP, ...(s || {}) };
    $('exp-episodes').value = String(d.episodes);
    $('exp-seeds').value = String(d.seeds);
    $('exp-seed').value = String(d.seed);
    $('exp-delta').value = String(d.delta);
    $('exp-decompose').checked = Boolean(d.decompose);
    $('exp-shared').checked = Boolean(d.sharedDraws);
    this.rows.replaceChildren();
    for (const l of Array.isArray(d.learners) ? d.learners : DEFAULT_SETUP.learners) {
      if (l && (this.algorithms.has(l.algorithm) || (typeof l.guest === 'string' && l.guest))) this.addRow(l);
    }
    this.noteScaled();
    $('sweep-param').value = d.sweep?.parameter || '';
    $('sweep-values').value = d.sweep?.values || '';
    this.syncSweepPicks();
  }

  /** The experiment file for the current model and form, and the learners' rows. */
  experimentFile() {
    const s = this.setup();
    const m = this.hooks.model();
    const rows = [];
    const learners = [];
    [...this.rows.children].forEach((tr, i) => {
      const l = s.learners[i];
      if (!l.use) return;
      let o;
      if (l.guest) o = { guest: l.guest };
      else {
        const p = this.algorithms.get(l.algorithm).param;
        o = { algorithm: l.algorithm };
        if (p) o[p.key] = l.value;
      }
      // A label the row came with (not typed here) that names a value the
      // sweep replaces is left out: the core labels the swept learner.
      const swept = s.sweep.parameter && !l.guest && l.swept !== false && this.algorithms.get(l.algorithm)?.param?.key === s.sweep.parameter;
      const typed = tr.querySelector('input[type=text]').dataset.typed === 'true';
      if (l.label.trim() && (typed || !swept)) o.label = l.label.trim();
      learners.push(o);
      rows.push(tr);
    });
    const exp = { format: 'burnin-experiment', version: 1, name: `${m.name} experiment`, episodes: s.episodes, seeds: s.seeds, seed: s.seed, delta: s.delta, learners };
    if (s.decompose) exp.decompose = true;
    if (s.sharedDraws) exp.shared_draws = true;
    if (s.sweep.parameter) {
      exp.sweep = { parameter: s.sweep.parameter, values: s.sweep.values.split(/[,\s]+/).filter(Boolean).map(Number) };
      // Learners the sweep could apply to, and those the user left it on for.
      const takes = (l) => !l.guest && this.algorithms.get(l.algorithm)?.param?.key === s.sweep.parameter;
      const used = s.learners.filter((l) => l.use);
      const able = used.map((l, i) => (takes(l) ? i : -1)).filter((i) => i >= 0);
      const chosen = able.filter((i) => used[i].swept !== false);
      if (chosen.length && chosen.length < able.length) exp.sweep.learners = chosen;
    }
    const byGenerator = s.sweep.parameter && m.generator && !this.catalogue.sweep_keys.includes(s.sweep.parameter);
    // `head`: the experiment without its model, for reading the set-up back
    // without parsing a model of up to the file limit on this thread.
    if (byGenerator) return { text: JSON.stringify({ ...exp, generator: m.generator }), rows, head: exp };
    // The model file's text goes in as it is (the core reads it), unparsed.
    const head = JSON.stringify(exp);
    return { text: `${head.slice(0, -1)},"model":${m.text}}`, rows, head: exp };
  }

  showProblems(result, rows) {
    const box = $('exp-problems');
    const list = box.querySelector('ul');
    list.replaceChildren();
    for (const p of result.problems) {
      list.append(el('li', p.path ? `${p.path}: ${p.message}` : p.message));
      const m = /^learners\[(\d+)\]\.(\w+)/.exec(p.path);
      if (m && rows[Number(m[1])]) {
        const [, alg, param, label] = rows[Number(m[1])].querySelectorAll('input, select');
        const target = { algorithm: alg, guest: alg, label }[m[2]] || param;
        target.setAttribute('aria-invalid', 'true');
      }
      const top = { episodes: 'exp-episodes', seeds: 'exp-seeds', seed: 'exp-seed', delta: 'exp-delta' }[p.path];
      if (top) $(top).setAttribute('aria-invalid', 'true');
      if (p.path.startsWith('sweep')) $('sweep-values').setAttribute('aria-invalid', 'true');
    }
    if (result.unlisted > 0) list.append(el('li', `… and ${result.unlisted} more problems`));
    box.hidden = false;
  }

  /** Problems for the learners of `file` that name a learner of yours not loaded here. */
  guestProblems(file) {
    const kept = new Set(store.keptGuests().map((k) => k.name));
    return file.head.learners.flatMap((l, i) => (l.guest && !this.guests.has(l.guest) ? [{
      path: `learners[${i}].guest`,
      message: `your learner "${l.guest}" is not loaded: ${kept.has(l.guest) ? 'use the copy kept in this browser (Your learners, below the table) or ' : ''}add its file with "Add your learner…" (an experiment, a library entry or a link names a learner, never carries its code)`,
    }] : []));
  }

  /**
   * While the problems box is shown, reads the form again (through the core)
   * a moment after each edit: problems that are fixed disappear, and the box
   * closes when none is left.
   */
  /**
   * Says plainly which used rows carry a scaled bonus: their published
   * bounds do not apply, and a comparison with a row at scale 1 compares
   * two different things (the rows carry over when another model opens).
   */
  noteScaled() {
    const scaled = [...this.rows.children].filter((tr) => {
      const [use, alg, param] = tr.querySelectorAll('input, select');
      return use.checked && this.algorithms.get(alg.value)?.param?.key === 'bonus_scale' && Number(param.value) !== 1;
    }).map((tr) => {
      const [, alg, param, label] = tr.querySelectorAll('input, select');
      return label.value.trim() || `${alg.value} ×${param.value}`;
    });
    const note = $('scaled-note');
    note.hidden = scaled.length === 0;
    note.textContent = scaled.length ? `Scaled bonus (not the published constants; their bounds do not apply): ${scaled.join(', ')}. Set the scale to 1 for the algorithm as published.` : '';
  }

  recheckSoon() {
    if ($('exp-problems').hidden) return;
    clearTimeout(this.recheckTimer);
    this.recheckTimer = setTimeout(async () => {
      let file;
      try { file = this.experimentFile(); } catch { return; }
      const r = await checkExperiment(file.text);
      if ($('exp-problems').hidden) return;
      for (const e of document.querySelectorAll('#exp-form [aria-invalid]')) e.removeAttribute('aria-invalid');
      const problems = [...(r.ok ? [] : r.problems), ...this.guestProblems(file)];
      if (!problems.length) $('exp-problems').hidden = true;
      else this.showProblems({ problems, unlisted: r.ok ? 0 : r.unlisted }, file.rows);
    }, 250);
  }

  async run() {
    if (this.running || this.estimating) return;
    for (const e of document.querySelectorAll('#exp-form [aria-invalid]')) e.removeAttribute('aria-invalid');
    $('exp-problems').hidden = true;
    let file;
    try { file = this.experimentFile(); } catch (err) { this.showProblems({ problems: [{ path: '', message: err.message }], unlisted: 0 }, []); return; }
    const named = [...new Set(file.head.learners.map((l) => l.guest).filter(Boolean))];
    const missing = this.guestProblems(file);
    if (missing.length) {
      this.showProblems({ problems: missing, unlisted: 0 }, file.rows);
      return;
    }
    const guests = named.map((name) => ({ name, source: this.guests.get(name).source }));
    // Say how long it will take, and ask first when that is more than a few minutes.
    $('run-exp').disabled = true;
    $('exp-status').textContent = 'Estimating how long this run takes…';
    this.estimating = true;
    const est = await estimateRun(file.text, undefined, LONG_RUN_SECONDS).finally(() => { this.estimating = false; });
    $('run-exp').disabled = false;
    if (est.ok === false) { $('exp-status').textContent = ''; this.showProblems(est, file.rows); return; }
    if (est.over && !(await this.confirmLongRun(est.words))) {
      $('exp-status').textContent = `Not started: estimated ${est.words}.`;
      return;
    }
    const t0 = performance.now();
    // The set-up is what is running: it cannot change under the run.
    const fieldsets = [...document.querySelectorAll('#exp-form fieldset')];
    for (const f of fieldsets) f.disabled = true;
    $('run-exp').disabled = true;
    $('cancel-exp').disabled = false;
    $('exp-progress').value = 0;
    $('exp-status').textContent = 'Starting…';
    let live = true;
    // Episodes each learner runs in all (every sweep point), for the estimate.
    const spec = file.head;
    const points = spec.sweep ? spec.sweep.values.length : 1;
    const totals = spec.learners.map(() => spec.episodes * spec.seeds * points);
    const job = runExperiment(file.text, (done, total, measured) => {
      if (!live) return; // a late message from a worker that is stopping
      const secs = (performance.now() - t0) / 1000;
      const rate = done / Math.max(secs, 1e-3);
      $('exp-progress').max = total;
      $('exp-progress').value = done;
      const eta = timeLeft(totals, measured || [], job.workers);
      const left = eta.seconds === null ? 'timing the learners…' : `${eta.atLeast ? 'at least' : 'about'} ${eta.seconds.toFixed(1)} s left`;
      $('exp-status').textContent = `${grouped(done)} / ${grouped(total)} episodes · ${grouped(rate)} per second · ${left} · ${job.workers} worker${job.workers === 1 ? '' : 's'}`;
    }, undefined, guests);
    this.running = job;
    try {
      const r = await job.promise;
      if (r.cancelled) {
        const ms = Math.round(performance.now() - this.cancelAt);
        $('exp-status').dataset.cancelMs = String(ms);
        $('exp-status').textContent = `Cancelled after ${grouped(r.done)} of ${grouped(r.total)} episodes (stopped ${ms} ms after the click); nothing was kept from this run.`;
      } else if (r.ok === false) {
        $('exp-status').textContent = '';
        this.showProblems(r, file.rows);
      } else {
        const secs = (performance.now() - t0) / 1000;
        this.setResults(resultsOf(r, file.text));
        this.hooks.resultsReplaced?.();
        /** Whether these results are saved somewhere (library or a file): only then may opening another model clear them unasked. */
        this.resultsKept = false;
        $('exp-status').textContent = `Done in ${secs.toFixed(1)} s on ${job.workers} worker${job.workers === 1 ? '' : 's'}.`;
        this.hooks.changed();
        $('results').scrollIntoView({ block: 'start', behavior: 'instant' });
        offerGuide();
      }
    } catch (err) {
      $('exp-status').textContent = `The run failed: ${err.message}`;
    } finally {
      live = false;
      this.running = null;
      for (const f of fieldsets) f.disabled = false;
      $('run-exp').disabled = false;
      $('cancel-exp').disabled = true;
    }
  }

  /** Asks whether to start a run estimated at `words`; resolves true to run it. */
  confirmLongRun(words) {
    const d = $('long-run');
    $('long-run-text').textContent = `It is estimated to take ${words}.`;
    return new Promise((resolve) => {
      const done = (go) => { d.onclose = null; d.close(); resolve(go); };
      $('long-run-go').onclick = () => done(true);
      $('long-run-back').onclick = () => done(false);
      d.onclose = () => resolve(false);
      d.showModal();
      $('long-run-back').focus();
    });
  }

  /** Shows results {text, csv?, experiment?} (from a run, a file or the library). */
  setResults(r) {
    // Results opened from a file or the library are kept elsewhere already.
    this.resultsKept = true;
    this.presentCaption = undefined;
    const data = JSON.parse(r.text);
    this.results = { ...r, data, csv: r.csv || '' };
    const sweep = data.format === 'burnin-sweep';
    $('compare-section').hidden = sweep || !data.comparisons?.length;
    if (!sweep) {
      for (const [id, pick] of [['cmp-a', 0], ['cmp-b', 1]]) {
        const sel = $(id);
        sel.replaceChildren(...data.learners.map((l) => el('option', l.label, { value: l.label })));
        sel.selectedIndex = Math.min(pick, data.learners.length - 1);
      }
      this.showComparison();
    }
    const failed = $('results-failed');
    failed.replaceChildren();
    failed.hidden = !data.failed?.length;
    for (const f of data.failed || []) {
      failed.append(el('p', `Your learner "${f.label}" failed in seed ${f.seed_index}, episode ${grouped(f.episode)}: ${f.message}. It is left out of these results; the other learners' results stand.`));
    }
    $('export-csv').disabled = !this.results.csv;
    $('export-summary').disabled = !this.results.summaryCsv;
    $('export-seeds').disabled = !this.results.seedsCsv;
    // The comparison table's formats are the core's; the choice made stays.
    const tableSel = $('table-format');
    const picked = tableSel.value;
    tableSel.replaceChildren(...this.results.tables.map((t) => el('option', t.name, { value: t.key })));
    if (this.results.tables.some((t) => t.key === picked)) tableSel.value = picked;
    $('export-table').disabled = !this.results.tables.length;
    const decomposed = !sweep && data.learners.some((l) => l.regret_by_cell?.length);
    // A sweep's cells CSV holds every point's cells, the swept value first.
    const anyCells = decomposed || (sweep && data.points.some((p) => p.learners.some((l) => l.regret_by_cell?.length)));
    $('export-cells').disabled = !anyCells || !this.results.cellsCsv;
    for (const o of $('heat-view').options) if (o.value !== 'visits') o.disabled = !decomposed || (o.value === 'regret-diff' && data.learners.length < 2);
    if ($('heat-view').selectedOptions[0]?.disabled) $('heat-view').value = 'visits';
    // A results file does not hold the experiment that made it, which a
    // library entry keeps beside its results: the page says so.
    $('save-results').disabled = !r.experiment;
    $('save-results').title = r.experiment ? 'Keep the model, the experiment and these results in this browser' : SAVE_WHY_NOT;
    $('save-results-why').hidden = Boolean(r.experiment);
    $('results').hidden = false;
    const heatSel = $('heat-learner');
    heatSel.replaceChildren();
    $('heat-section').hidden = sweep;
    if (!sweep) data.learners.forEach((l, i) => heatSel.append(el('option', l.label, { value: String(i) })));
    this.openChart(this.results);
    this.drawTable();
    this.drawHeat();
    this.renderGlossary();
  }

  /**
   * The core's comparison of the chosen learners A and B: {c, sign} with
   * sign −1 when the core compared them as (B, A); null when it did not
   * compare them (more learners than it compares in all pairs).
   */
  comparison() {
    const a = $('cmp-a').value, b = $('cmp-b').value;
    for (const c of this.results?.data.comparisons || []) {
      if (c.a === a && c.b === b) return { c, sign: 1 };
      if (c.a === b && c.b === a) return { c, sign: -1 };
    }
    return null;
  }

  showComparison() {
    const out = $('cmp-verdict');
    if ($('cmp-a').value === $('cmp-b').value) { out.textContent = 'Choose two different learners.'; return; }
    const found = this.comparison();
    out.textContent = found ? found.c.verdict : 'Not compared: with more than ten learners each is compared with the first only.';
  }

  clearResults() {
    this.results = null;
    this.chart?.free();
    this.chart = null;
    $('results').hidden = true;
  }

  /**
   * Loads the chart of results `r` (drawn by the core on this thread) and
   * fills the view choices from it; results replaced meanwhile win.
   */
  async openChart(r) {
    this.chart?.free();
    this.chart = null;
    $('chart').dataset.series = '0';
    let chart;
    try {
      // Reading the chart data and drawing each run as a task of its own,
      // after the table and the map: no one task keeps the page busy long.
      await nextTask();
      if (this.results !== r) return;
      chart = await openChart(r.chartText);
    } catch (err) {
      $('chart-caption').textContent = `These results cannot be charted: ${err?.message || err}`;
      return;
    }
    if (this.results !== r) { chart.free(); return; }
    this.chart = chart;
    const view = $('chart-view');
    const was = view.value;
    view.replaceChildren(...chart.views().map((v) => el('option', v.label, { value: v.key })));
    if ([...view.options].some((o) => o.value === was)) view.value = was;
    await nextTask();
    if (this.chart !== chart) return;
    this.draw();
  }

  /** The chart options of the page's controls (see chart::Options in the core). */
  chartOptions(caption) {
    const view = $('chart-view').value || null;
    return {
      view,
      log: document.querySelector('input[name=axes]:checked').value === 'log',
      bands: $('show-bands').checked,
      lower: $('show-lower').checked,
      bounds: $('show-bounds').checked,
      compare: view === 'difference' ? [$('cmp-a').value, $('cmp-b').value] : null,
      caption,
    };
  }

  draw() {
    if (!this.chart) return;
    const canvas = $('chart');
    const w = Math.max(320, canvas.parentElement.clientWidth || 800);
    // Below 560 px the core puts the legend under the plot (src/chart/layout.rs),
    // so a phone's chart is taller than it is wide, and the plot keeps its room.
    const h = Math.round(Math.min(520, Math.max(300, w < 560 ? w * 1.25 : w * 0.5)));
    const r = drawInto(this.chart, canvas, this.chartOptions(false), w, h);
    this.ratio = r.ratio;
    canvas.dataset.series = String(r.ok ? r.series : 0);
    $('chart-caption').textContent = this.chart.caption(this.chartOptions(true));
  }

  hover(e) {
    const tip = $('chart-tip');
    if (!this.chart) return;
    const rect = e.target.getBoundingClientRect();
    const px = e.clientX - rect.left, py = e.clientY - rect.top;
    // The core's own data↔pixel mapping of the drawing, in canvas pixels.
    const r = this.chart.readout(px * this.ratio, py * this.ratio);
    if (!r) { tip.hidden = true; return; }
    tip.textContent = r.lines.join('\n');
    tip.hidden = false;
    const x = r.px / this.ratio;
    tip.style.left = `${Math.min(x + 12, rect.width - tip.offsetWidth - 4)}px`;
    tip.style.top = `${Math.max(4, py - tip.offsetHeight - 10)}px`;
  }

  drawTable() {
    // A definition open beside a header of the old table goes with it.
    closeDefinition();
    const d = this.results.data;
    const table = el('table');
    const head = el('tr');
    const body = table.createTBody();
    if (d.format === 'burnin-sweep') {
      // Every cell holds the regret at K with its interval, the slope and the burn-in.
      head.append(el('th', 'learner', { scope: 'col' }), ...d.values.map((v) => this.header(`${d.parameter} = ${v}`, ['regret', 'interval', 'slope', 'burn_in'], `the numbers at ${d.parameter} = ${v}`)));
      for (const [li, l] of d.learners.entries()) {
        const tr = el('tr');
        tr.append(el('th', l.label));
        l.regret_mean.forEach((m, i) => {
          const r = this.results.readings?.[i]?.[li];
          const td = el('td', r ? `${r.regret} ${r.regret_interval}` : `${short(m)} ${interval(d, l.regret_lo[i], l.regret_hi[i])}`, { 'data-value': String(m) });
          if (r) td.append(el('div', `slope ${r.slope} · burn-in ${r.burn_in}`, { class: 'reading' }));
          tr.append(td);
        });
        body.append(tr);
      }
      // How burn-in and regret at K grow with the size the sweep changes
      // (the core's scaling readings, beside the published orders).
      for (const t of this.results.scaling ?? []) {
        const tr = el('tr', null, { class: 'scaling-row' });
        const th = el('th', `${t.label}: scaling in ${t.variable}`);
        th.append(definitionButton(`the scaling of ${t.label}`, this.terms('scaling')));
        tr.append(th, el('td', `${t.burn_in} · ${t.regret}`, { colspan: String(d.values.length) }));
        body.append(tr);
      }
    } else {
      const eps = d.learners[0].episodes_to_eps;
      // Each header says what its number is, from the core's glossary.
      const hint = (text, ...keys) => this.header(text, keys);
      // The long ε headers: a class the phone layout widens, and a short name for a screen reader.
      const epsHint = (e, text) => { const th = this.header(text, ['first_optimal', 'optimal_share', 'settled'], `the readings at ε = ${short(e.epsilon)}`); th.classList.add('eps'); return th; };
      head.append(el('th', 'learner', { scope: 'col' }), hint('regret at K', 'regret'), hint('95% interval', 'interval'), hint('slope [95% bootstrap]', 'slope'), hint('burn-in [95% bootstrap]', 'burn_in'), hint('model updates', 'model_updates'),
        ...eps.map((e) => epsHint(e, `ε = ${short(e.epsilon)}${e.trivial ? ' (at least V*: every policy qualifies)' : ''}: first ε-optimal episode (PAC order ${short(e.pac_order)}, Zhang et al. 2024) · share ε-optimal · settled within ε after`)));
      const reading = (i) => this.results.readings?.[0]?.[i] ?? { slope: '—', burn_in: '—' };
      for (const [i, l] of d.learners.entries()) {
        const last = l.regret_mean.length - 1;
        const updates = l.model_updates.reduce((a, b) => a + b, 0) / l.model_updates.length;
        const tr = el('tr');
        tr.append(el('th', l.label), el('td', reading(i).regret ?? short(l.regret_mean[last]), { 'data-value': String(l.regret_mean[last]) }), el('td', reading(i).regret_interval ?? interval(d, l.regret_lo[last], l.regret_hi[last])),
          el('td', reading(i).slope), el('td', reading(i).burn_in),
          el('td', updates.toFixed(1)));
        l.episodes_to_eps.forEach((e, j) => {
          const share = (e.optimal_share || []).reduce((a, b) => a + b, 0) / Math.max(1, (e.optimal_share || []).length);
          const first = reading(i).first_optimal?.[j] ?? '—';
          tr.append(el('td', `${first} · ${(100 * share).toFixed(1)}% · ${reading(i).settled_within?.[j] ?? '—'}`));
        });
        body.append(tr);
      }
    }
    table.createTHead().append(head);
    if (oneSeed(d)) table.createCaption().append(el('span', 'One seed per learner: a 95% interval needs at least two; run 8 or more seeds to compare learners.', { class: 'warn', 'data-warning': 'one-seed' }));
    $('results-table').replaceChildren(table);
  }

  /**
   * The step × state map of the chosen view: mean visits; where a learner's
   * regret is paid (the core's exact decomposition, summed over actions, the
   * action split on hover); or that map's difference between the compared
   * learners A and B.
   */
  drawHeat() {
    const d = this.results?.data;
    if (!d || d.format === 'burnin-sweep') return;
    const view = $('heat-view').value;
    const byLabel = (id) => d.learners.find((x) => x.label === $(id).value) || d.learners[0];
    const l = view === 'regret-diff' ? byLabel('cmp-a') : d.learners[Number($('heat-learner').value) || 0];
    const other = view === 'regret-diff' ? byLabel('cmp-b') : null;
    // The A − B map is of the compared pair: no learner box of its own.
    $('heat-learner').closest('label').hidden = view === 'regret-diff';
    const total = (x) => x.regret_mean[x.regret_mean.length - 1];
    const cell = (h, s) => {
      if (view === 'visits') return l.visits[h][s];
      const x = l.regret_by_step_state[h][s];
      return other ? x - other.regret_by_step_state[h][s] : x;
    };
    const H = l.visits.length, S = l.visits[0].length;
    let hi = 0;
    for (let h = 0; h < H; h++) for (let s = 0; s < S; s++) hi = Math.max(hi, Math.abs(cell(h, s)));
    const states = d.state_labels?.length ? d.state_labels : (this.hooks.model().states || []);
    const actions = d.action_labels || [];
    const title = { visits: 'Visits per step and state', regret: 'Where regret is paid', 'regret-diff': 'Where regret is paid: A − B' }[view];
    $('heat-title').textContent = title;
    let caption;
    if (view === 'visits') caption = 'Mean visits of each (step, state) per run; darker is visited more.';
    else if (view === 'regret') {
      const shown = l.regret_by_state.reduce((a, b) => a + b, 0);
      caption = `${l.label}: mean regret paid in each (step, state), the exact occupancy × gap summed over its episodes (hover for the split by action); darker pays more. The cells hold ${short(shown)} of its regret ${short(total(l))} at K (${(100 * shown / Math.max(total(l), 1e-300)).toFixed(1)}%).`;
    } else {
      caption = `${l.label} (A) minus ${other.label} (B): regret paid in each (step, state); ember where A pays more, teal where B does. Totals at K: A ${short(total(l))}, B ${short(total(other))}.`;
    }
    $('heat-caption').textContent = caption;
    const table = el('table');
    const head = el('tr');
    head.append(el('th', 'state'));
    for (let h = 0; h < Math.min(H, 60); h++) head.append(el('th', `h=${h + 1}`));
    table.createTHead().append(head);
    const body = table.createTBody();
    for (let s = 0; s < Math.min(S, 200); s++) {
      const tr = el('tr');
      tr.append(el('th', states[s] ?? `state ${s}`));
      for (let h = 0; h < Math.min(H, 60); h++) {
        const x = cell(h, s);
        const t = hi > 0 ? Math.abs(x) / hi : 0;
        const td = el('td', view === 'visits' && x >= 100 ? grouped(x) : view === 'visits' ? x.toFixed(1) : short(x), { 'data-value': String(x) });
        if (view === 'regret-diff') {
          td.style.background = x === 0 ? '' : `color-mix(in srgb, ${x > 0 ? 'var(--ember)' : 'var(--teal)'} ${Math.round(t * 85)}%, var(--card))`;
          td.style.color = t > 0.55 ? '#fff' : '';
        } else {
          td.style.background = valueColour(t);
          td.style.color = inkOn(t);
        }
        if (view !== 'visits') {
          const split = (x2) => x2.regret_by_cell[h][s].map((v, a) => `${actions[a] ?? `action ${a}`} ${short(v)}`).join(', ');
          td.title = other
            ? `h=${h + 1}, ${states[s] ?? s}: A ${split(l)}; B ${split(other)}`
            : `h=${h + 1}, ${states[s] ?? s}: ${short(x)} (${(100 * x / Math.max(total(l), 1e-300)).toFixed(1)}% of the regret at K) — ${split(l)}`;
        }
        tr.append(td);
      }
      body.append(tr);
    }
    $('heat-wrap').replaceChildren(table);
  }

  /** The PNG export: the core's chart drawn on a canvas of the export size. */
  exportPng() {
    if (!this.chart) return;
    const c = document.createElement('canvas');
    c.width = EXPORT.width;
    c.height = EXPORT.height;
    this.chart.draw(c, this.chartOptions(true), EXPORT.scale);
    c.toBlob((b) => download(`${this.fileBase()}-chart.png`, b, 'image/png'), 'image/png');
  }

  /** The SVG export: what `burnin plot --output x.svg` writes for the same results and options. */
  svgText() { return this.chart.svg(this.chartOptions(true), EXPORT.width, EXPORT.height, EXPORT.scale); }

  exportSvg() { if (this.chart) download(`${this.fileBase()}-chart.svg`, this.svgText(), 'image/svg+xml'); }

  present() {
    if (!this.chart) return;
    // A caption the user wrote is kept for these results until new ones come.
    $('present-caption').value = this.presentCaption ?? this.chart.caption(this.chartOptions(true));
    $('presenter').hidden = false;
    // The page under the presentation does not scroll, so its scrollbar does not show through.
    document.documentElement.classList.add('presenting');
    this.drawPresent();
    $('present-close').focus();
  }

  drawPresent() {
    const c = $('present-chart');
    // The bar (caption and Close) keeps its own height, wrapped or not, so
    // the chart never covers Close on a small screen.
    const bar = document.querySelector('#presenter .presenter-bar');
    const w = window.innerWidth, h = Math.max(160, window.innerHeight - bar.offsetHeight);
    drawInto(this.chart, c, this.chartOptions(false), w, h, Math.max(1.4, w / 900));
  }

  closePresent() {
    $('presenter').hidden = true;
    document.documentElement.classList.remove('presenting');
    $('present').focus();
  }
}
