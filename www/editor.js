// The model editor: every field of a model file, transitions as a dense grid
// per step, checked by the core as you type with each problem shown at its
// cell. Nothing changes the open model until "Use this model".
import { check } from './compute.js';
import { el } from './dom.js';

/** Largest model edited cell by cell (S·A rows × S columns). */
const MAX_CELLS = 4000;
/** Most states whose start probabilities get a field each. */
const MAX_START_FIELDS = 200;
const $ = (id) => document.getElementById(id);


/** A reward as short text: "0.5", "bernoulli 0.3", "uniform 0 0.6", "beta 2 1". */
export function rewardText(r) {
  if (typeof r === 'number') return String(r);
  if (r && typeof r === 'object') {
    if ('bernoulli' in r) return `bernoulli ${r.bernoulli}`;
    if ('uniform' in r) return `uniform ${r.uniform.join(' ')}`;
    if ('beta' in r) return `beta ${r.beta.join(' ')}`;
  }
  return String(r);
}

/** The reward a text stands for; unreadable text is kept as a string, which the core reports at its cell. */
export function parseReward(text) {
  const t = text.trim().split(/\s+/);
  const nums = t.slice(1).map(Number);
  if (t.length === 1 && t[0] !== '' && Number.isFinite(Number(t[0]))) return Number(t[0]);
  if (t[0] === 'bernoulli' && nums.length === 1 && nums.every(Number.isFinite)) return { bernoulli: nums[0] };
  if ((t[0] === 'uniform' || t[0] === 'beta') && nums.length === 2 && nums.every(Number.isFinite)) return { [t[0]]: nums };
  return text;
}

export class Editor {
  /** onUse(text): open the edited model. */
  constructor(onUse) {
    this.onUse = onUse;
    this.doc = null;
    this.step = 0;
    this.seq = 0;
    $('ed-apply').addEventListener('click', () => this.onUse(JSON.stringify(this.doc)));
    $('ed-revert').addEventListener('click', () => this.load(this.original, this.facts));
    $('ed-step').addEventListener('change', () => { this.step = Number($('ed-step').value); this.renderGrid(); this.validate(); });
    $('ed-stationary').addEventListener('change', () => this.setStationary($('ed-stationary').checked));
    for (const [id, key, conv] of [['ed-name', 'name', String], ['ed-notes', 'notes', String], ['ed-horizon', 'horizon', Number]]) {
      $(id).addEventListener('input', () => { this.doc[key] = conv($(id).value); if (key === 'horizon') this.fitSteps(); this.validate(); });
    }
    $('ed-states').addEventListener('change', () => this.setLabels('states', $('ed-states').value));
    $('ed-actions').addEventListener('change', () => this.setLabels('actions', $('ed-actions').value));
  }

  /**
   * Loads a model into the editor: `doc` is the model in the core's
   * canonical form (every field explicit), `facts` the core's summary of it
   * (sizes, stationary or not). The editor works on its own copy.
   */
  load(doc, facts) {
    this.original = doc;
    this.facts = facts;
    this.doc = structuredClone(doc);
    this.step = 0;
    const d = this.doc;
    $('ed-name').value = d.name || '';
    $('ed-notes').value = d.notes || '';
    $('ed-horizon').value = String(d.horizon);
    $('ed-states').value = d.states.join(', ');
    $('ed-actions').value = d.actions.join(', ');
    $('ed-stationary').checked = facts.stationary;
    this.render();
    this.validate();
  }

  tables() { return this.doc.stationary ? 1 : this.doc.steps.length; }

  /** Keeps one table per step when H changes in the per-step form. */
  fitSteps() {
    const d = this.doc;
    if (d.stationary) return;
    const h = Math.max(1, Math.min(500, Math.floor(d.horizon) || 1));
    while (d.steps.length < h) d.steps.push(structuredClone(d.steps[d.steps.length - 1]));
    d.steps.length = h;
    this.step = Math.min(this.step, h - 1);
    this.render();
  }

  setStationary(on) {
    const d = this.doc;
    if (on) {
      d.stationary = true;
      d.steps = [d.steps[this.step] || d.steps[0]];
      this.step = 0;
    } else {
      d.stationary = false;
      d.steps = Array.from({ length: Math.max(1, d.horizon) }, () => structuredClone(d.steps[0]));
    }
    this.render();
    this.validate();
  }

  /** Renames, adds or removes states or actions from a comma-separated list. */
  setLabels(key, text) {
    const d = this.doc;
    const labels = text.split(',').map((s) => s.trim());
    const old = d[key].length;
    d[key] = labels;
    const S = d.states.length, A = d.actions.length;
    if (key === 'states') {
      d.start = labels.map((_, i) => d.start[i] ?? 0);
      if (d.layout) d.layout.positions = labels.map((_, i) => d.layout.positions[i] || [i, 0]);
    }
    for (const st of d.steps) {
      const grow = (rows, fill) => {
        rows.length = Math.min(rows.length, S);
        while (rows.length < S) rows.push(Array.from({ length: A }, fill));
        for (const r of rows) { r.length = Math.min(r.length, A); while (r.length < A) r.push(fill()); }
      };
      grow(st.transitions, () => []);
      grow(st.rewards, () => 0);
      if (key === 'states' && S < old) {
        for (const r of st.transitions) for (const cell of r) for (let k = cell.length - 1; k >= 0; k--) if (cell[k][0] >= S) cell.splice(k, 1);
      }
    }
    this.render();
    this.validate();
  }

  render() {
    const d = this.doc;
    const sel = $('ed-step');
    sel.replaceChildren();
    for (let h = 0; h < this.tables(); h++) sel.append(el('option', d.stationary ? 'every step' : `step ${h + 1}`, { value: String(h) }));
    sel.value = String(this.step);
    sel.disabled = d.stationary;
    const start = $('ed-start');
    start.replaceChildren();
    if (d.states.length > MAX_START_FIELDS) {
      start.append(el('p', `${d.states.length} states: too many to edit one by one here; edit the file's "start" instead.`, { class: 'caption' }));
      this.renderGrid();
      return;
    }
    d.states.forEach((s, i) => {
      const lab = el('label', s || `state ${i}`);
      const inp = el('input', null, { type: 'number', step: 'any', min: '0', max: '1', 'data-path': `start[${i}]` });
      inp.value = String(d.start[i] ?? 0);
      inp.addEventListener('input', () => { d.start[i] = inp.value === '' ? 0 : Number(inp.value); this.validate(); });
      lab.append(inp);
      start.append(lab);
    });
    this.renderGrid();
  }

  renderGrid() {
    const d = this.doc;
    const S = d.states.length, A = d.actions.length, h = this.step;
    const wrap = $('ed-grid');
    if (S * A * S > MAX_CELLS) {
      wrap.replaceChildren(el('p', `This model has ${S} states and ${A} actions, too many to edit cell by cell here; edit its file and open it again.`, { class: 'caption' }));
      return;
    }
    const st = d.steps[h];
    const table = el('table', null, { class: 'grid-editor' });
    const head = el('tr');
    head.append(el('th', 'state'), el('th', 'action'), ...d.states.map((s) => el('th', `→ ${s}`)), el('th', 'reward'), el('th', 'row'), el('th', 'check'));
    table.createTHead().append(head);
    const body = table.createTBody();
    for (let s = 0; s < S; s++) {
      for (let a = 0; a < A; a++) {
        const tr = el('tr', null, { 'data-row': `steps[${h}].transitions[${s}][${a}]` });
        tr.append(el('th', a === 0 ? d.states[s] : ''), el('th', d.actions[a]));
        const cell = st.transitions[s][a];
        for (let t = 0; t < S; t++) {
          const td = el('td');
          const k = cell.findIndex((e) => e[0] === t);
          const inp = el('input', null, { type: 'number', step: 'any', min: '0', max: '1', 'aria-label': `P(${d.states[t]} | ${d.states[s]}, ${d.actions[a]})` });
          if (k >= 0) { inp.value = String(cell[k][1]); inp.dataset.path = `steps[${h}].transitions[${s}][${a}][${k}][1]`; }
          inp.addEventListener('focus', () => { tr.dataset.last = String(t); });
          inp.addEventListener('input', () => {
            tr.dataset.last = String(t);
            const j = cell.findIndex((e) => e[0] === t);
            const p = inp.value === '' ? null : Number(inp.value);
            if (p === null || p === 0) { if (j >= 0) cell.splice(j, 1); } else if (j >= 0) cell[j][1] = p; else cell.push([t, p]);
            this.renumber(tr, cell, h, s, a);
            this.validate();
          });
          td.append(inp);
          tr.append(td);
        }
        const rtd = el('td');
        const rin = el('input', null, { type: 'text', 'data-path': `steps[${h}].rewards[${s}][${a}]`, 'aria-label': `reward of ${d.states[s]}, ${d.actions[a]}`, class: 'reward-input' });
        rin.value = rewardText(st.rewards[s][a]);
        rin.addEventListener('input', () => { st.rewards[s][a] = parseReward(rin.value); this.validate(); });
        rtd.append(rin);
        const tools = el('td', null, { class: 'row-tools' });
        const norm = el('button', 'normalise', { type: 'button', title: 'Divide every entry of this row by the row\'s sum' });
        const rest = el('button', 'remainder here', { type: 'button', title: 'Put 1 − (the other entries) into the cell you edited last in this row' });
        norm.addEventListener('click', () => {
          const sum = cell.reduce((acc, e) => acc + e[1], 0);
          if (!(sum > 0)) return;
          for (const e of cell) e[1] /= sum;
          this.refreshRow(tr, cell);
        });
        rest.addEventListener('click', () => {
          const t = Number(tr.dataset.last ?? S - 1);
          const others = cell.reduce((acc, e) => acc + (e[0] === t ? 0 : e[1]), 0);
          const p = Math.max(0, 1 - others);
          const j = cell.findIndex((e) => e[0] === t);
          if (p === 0) { if (j >= 0) cell.splice(j, 1); } else if (j >= 0) cell[j][1] = p; else cell.push([t, p]);
          this.refreshRow(tr, cell);
        });
        tools.append(norm, rest);
        tr.append(rtd, tools, el('td', '', { class: 'row-check' }));
        body.append(tr);
      }
    }
    wrap.replaceChildren(table);
  }

  /** Shows a row's entries again after a tool changed them, and checks the model. */
  refreshRow(tr, cell) {
    const [, h, s, a] = /\[(\d+)\]\.transitions\[(\d+)\]\[(\d+)\]/.exec(tr.dataset.row).map(Number);
    tr.querySelectorAll('td input[type=number]').forEach((inp, t) => {
      const e = cell.find((x) => x[0] === t);
      inp.value = e ? String(e[1]) : '';
    });
    this.renumber(tr, cell, h, s, a);
    this.validate();
  }

  /** A problem's place in words: "step 2, row "cave mouth", "go left"" rather than its JSON path. */
  where(path) {
    const d = this.doc;
    const m = /^steps\[(\d+)\]\.(transitions|rewards)\[(\d+)\]\[(\d+)\](?:\[(\d+)\])?/.exec(path);
    if (m) {
      const [, h, kind, s, a, k] = m.map((x) => (x === undefined ? undefined : Number(x)));
      const step = d.stationary ? 'every step' : `step ${h + 1}`;
      const name = (list, i) => (list[i] !== undefined ? `"${list[i]}"` : `#${i}`);
      const entry = kind === 'transitions' && k !== undefined ? `, entry → ${name(d.states, d.steps[h]?.transitions[s]?.[a]?.[k]?.[0])}` : '';
      return `${step}, ${kind === 'rewards' ? 'reward of' : 'row'} ${name(d.states, s)}, ${name(d.actions, a)}${entry}`;
    }
    const st = /^start\[(\d+)\]/.exec(path);
    if (st) return `start probability of "${d.states[Number(st[1])] ?? st[1]}"`;
    return path;
  }

  /** Entry k's input carries the JSON path of entry k after an edit reorders the row. */
  renumber(tr, cell, h, s, a) {
    const inputs = tr.querySelectorAll('td input[type=number]');
    inputs.forEach((inp, t) => {
      const k = cell.findIndex((e) => e[0] === t);
      if (k >= 0) inp.dataset.path = `steps[${h}].transitions[${s}][${a}][${k}][1]`; else delete inp.dataset.path;
    });
  }

  /** Checks the edited model in the worker and shows each problem at its cell. */
  async validate() {
    const seq = ++this.seq;
    const text = JSON.stringify(this.doc);
    const r = await check(text);
    if (seq !== this.seq) return; // a newer edit is being checked
    for (const e of document.querySelectorAll('#panel-editor [aria-invalid]')) { e.removeAttribute('aria-invalid'); e.removeAttribute('title'); }
    for (const c of document.querySelectorAll('#panel-editor .row-check')) c.textContent = '';
    const list = $('ed-problems');
    list.replaceChildren();
    if (r.ok) {
      $('ed-summary').textContent = `Valid: S=${r.states.length}, A=${r.actions.length}, H=${r.horizon}, ${r.entries} transition entries.`;
      $('ed-apply').disabled = false;
      return;
    }
    $('ed-apply').disabled = true;
    $('ed-summary').textContent = `${r.problems.length + r.unlisted} problem${r.problems.length + r.unlisted === 1 ? '' : 's'}:`;
    for (const p of r.problems) {
      const line = p.path ? `${this.where(p.path)}: ${p.message}` : p.message;
      list.append(el('li', line));
      const target = this.cellFor(p.path);
      if (target) {
        target.setAttribute('aria-invalid', 'true');
        target.title = p.message;
        const row = target.closest('tr');
        const msg = row && row.querySelector('.row-check');
        if (msg) msg.textContent = p.message;
      }
    }
  }

  /** The input (or grid row's check cell) a problem path points at. */
  cellFor(path) {
    const panel = $('panel-editor');
    const exact = panel.querySelector(`[data-path="${CSS.escape(path)}"]`);
    if (exact) return exact;
    const m = /^(steps\[\d+\]\.(?:transitions|rewards)\[\d+\]\[\d+\])/.exec(path);
    if (m) {
      const rowPath = m[1].replace('.rewards', '.transitions');
      const row = panel.querySelector(`tr[data-row="${CSS.escape(rowPath)}"]`);
      if (row) return path.includes('.rewards') ? row.querySelector('.reward-input') : row.querySelector('.row-check');
    }
    const field = { name: 'ed-name', notes: 'ed-notes', horizon: 'ed-horizon', start: 'ed-start', steps: 'ed-step' }[path.split(/[.[]/)[0]];
    if (path.startsWith('states')) return $('ed-states');
    if (path.startsWith('actions')) return $('ed-actions');
    return field ? $(field) : null;
  }
}
