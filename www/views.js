// Views: one render function each. Text from files reaches the DOM only
// through textContent, never as HTML.
import { cell, headline, valueColour, inkOn } from './format.js';
import { el } from './dom.js';

/** Largest table drawn in full; beyond it the first rows/columns are shown. */
const MAX_ROWS = 100;
const MAX_COLS = 30;
/** Most cells in one table: laying out more blocks the page (measured). */
const MAX_TABLE_CELLS = 1500;


export function renderFacts(root, m) {
  const facts = {
    name: m.name || '(unnamed)',
    notes: m.notes || '—',
    S: String(m.states.length),
    A: String(m.actions.length),
    H: String(m.horizon),
    kind: m.stationary ? 'stationary (one table for every step)' : 'time-dependent (one table per step)',
    entries: String(m.entries),
  };
  for (const [k, v] of Object.entries(facts)) root.querySelector(`[data-fact="${k}"]`).textContent = v;
}

export function renderProblems(root, fileName, result) {
  const list = root.querySelector('ul');
  list.replaceChildren();
  for (const p of result.problems) list.append(el('li', p.path ? `${p.path}: ${p.message}` : p.message));
  if (result.unlisted > 0) list.append(el('li', `… and ${result.unlisted} more problems`));
  const n = result.problems.length + result.unlisted;
  root.querySelector('.problems-lead').textContent =
    `${fileName}: ${n} problem${n === 1 ? '' : 's'}. Nothing else changed.`;
  root.hidden = false;
}

export function renderOptimal(out, value) {
  out.textContent = headline(value);
  out.dataset.value = String(value);
}

function capNote(table, shownRows, rows, shownCols, cols, span) {
  if (shownRows === rows && shownCols === cols) return;
  const tr = el('tr', undefined, { class: 'note-row' });
  const td = el('td', `Showing ${shownRows} of ${rows} states and ${shownCols} of ${cols} columns; the JSON from “burnin solve --json” has them all.`);
  td.colSpan = span;
  tr.append(td);
  table.tBodies[0].append(tr);
}

/** V*: rows states, columns steps; the optimal action under each value. */
export function renderValues(wrap, sol) {
  const S = sol.states.length, H = sol.horizon;
  const cols = Math.min(H, MAX_COLS);
  const rows = Math.min(S, MAX_ROWS, Math.floor(MAX_TABLE_CELLS / cols));
  // The colour range of the cells shown (an index loop: iterating a large
  // typed array with for…of is many times slower).
  let lo = Infinity, hi = -Infinity;
  for (let h = 0; h < cols; h++) {
    for (let s = 0; s < rows; s++) { const x = sol.v[h * S + s]; if (x < lo) lo = x; if (x > hi) hi = x; }
  }
  const span = hi - lo || 1;
  const table = el('table');
  const head = el('tr');
  head.append(el('th', 'state'));
  for (let h = 0; h < cols; h++) head.append(el('th', `h=${h + 1}`));
  table.createTHead().append(head);
  const body = table.createTBody();
  for (let s = 0; s < rows; s++) {
    const tr = el('tr');
    tr.append(el('th', sol.states[s]));
    for (let h = 0; h < cols; h++) {
      const x = sol.v[h * S + s];
      const t = (x - lo) / span;
      const td = el('td', cell(x));
      td.append(el('small', sol.actions[sol.policy[h * S + s]]));
      td.style.background = valueColour(t);
      td.style.color = inkOn(t);
      tr.append(td);
    }
    body.append(tr);
  }
  capNote(table, rows, S, cols, H, cols + 1);
  wrap.replaceChildren(table);
}

/** Q* and gaps at one step (`q`: Q* of that step, [s][a]): rows states, columns actions. */
export function renderQ(wrap, sol, step, q) {
  const S = sol.states.length, A = sol.actions.length;
  const rows = Math.min(S, MAX_ROWS), cols = Math.min(A, MAX_COLS);
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < S * A; i++) { const x = q[i]; if (x < lo) lo = x; if (x > hi) hi = x; }
  const span = hi - lo || 1;
  const table = el('table');
  const head = el('tr');
  head.append(el('th', 'state'));
  for (let a = 0; a < cols; a++) head.append(el('th', sol.actions[a]));
  table.createTHead().append(head);
  const body = table.createTBody();
  for (let s = 0; s < rows; s++) {
    const tr = el('tr');
    tr.append(el('th', sol.states[s]));
    const best = sol.policy[step * S + s];
    for (let a = 0; a < cols; a++) {
      const i = s * A + a;
      const t = (q[i] - lo) / span;
      const td = el('td', cell(q[i]));
      // The gap Δ = V* − Q*, never below 0 (as the core's Solution::gaps).
      td.append(el('small', `Δ ${cell(Math.max(0, sol.v[step * S + s] - q[i]))}`));
      td.style.background = valueColour(t);
      td.style.color = inkOn(t);
      if (a === best) { td.classList.add('best'); td.title = 'optimal action'; }
      tr.append(td);
    }
    body.append(tr);
  }
  capNote(table, rows, S, cols, A, cols + 1);
  wrap.replaceChildren(table);
}
