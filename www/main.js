// The page: chooses a model, asks the worker to solve it, renders the views.
import { solve } from './compute.js';
import { renderFacts, renderProblems, renderOptimal, renderValues, renderQ } from './views.js';

const $ = (id) => document.getElementById(id);
let current = null; // the solution on screen

function setStatus(text) { $('status').textContent = text; }

function show(sol) {
  current = sol;
  $('problems').hidden = true;
  renderFacts($('model-facts'), sol);
  renderOptimal($('optimal-value'), sol.optimal_value);
  renderValues($('value-wrap'), sol);
  const step = $('step');
  step.max = String(sol.horizon);
  step.value = '1';
  showStep();
  document.title = `${sol.name || 'Model'} — Burnin`;
}

function showStep() {
  if (!current) return;
  const h = Number($('step').value) - 1;
  $('step-shown').textContent = String(h + 1);
  renderQ($('q-wrap'), current, h);
}

/** Solves `text`; a bad file shows its problems and leaves the open model as it was. */
async function open(text, label) {
  setStatus(`Solving ${label}…`);
  const t0 = performance.now();
  const result = await solve(text);
  if (!result.ok) {
    renderProblems($('problems'), label, result);
    setStatus(current ? `Still showing “${current.name}”.` : 'No model open.');
    return false;
  }
  show(result);
  setStatus(`Solved ${label} by backward induction in ${Math.max(1, Math.round(performance.now() - t0))} ms.`);
  return true;
}

async function openDemo(file) {
  const resp = await fetch(`demo-models/${file}`);
  if (!resp.ok) throw new Error(`cannot load demo model ${file} (${resp.status})`);
  await open(await resp.text(), file);
}

async function openFile(file) {
  if (!file) return;
  await open(await file.text(), file.name);
}

async function start() {
  const index = await (await fetch('demo-models/index.json')).json();
  const select = $('demo-select');
  for (const f of index.models) {
    const o = document.createElement('option');
    o.value = f;
    o.textContent = f.replace(/\.json$/, '').replace(/-/g, ' ');
    select.append(o);
  }
  select.value = index.default;
  select.addEventListener('change', () => openDemo(select.value).catch(fail));
  $('open-file').addEventListener('click', () => $('file-input').click());
  $('file-input').addEventListener('change', (e) => {
    openFile(e.target.files[0]).catch(fail);
    e.target.value = '';
  });
  $('step').addEventListener('input', showStep);
  document.addEventListener('dragover', (e) => { e.preventDefault(); document.body.classList.add('dropping'); });
  document.addEventListener('dragleave', () => document.body.classList.remove('dropping'));
  document.addEventListener('drop', (e) => {
    e.preventDefault();
    document.body.classList.remove('dropping');
    openFile(e.dataTransfer.files[0]).catch(fail);
  });
  await openDemo(index.default);
}

function fail(err) {
  setStatus(`Something went wrong: ${err.message}`);
  console.error(err);
}

start().catch(fail);
