// Runs the reference workloads in a worker and shows their figures; also
// offers `window.benchRun({quick, only, noLearners, research})` (a promise of the
// figures' JSON text) for the benchmark script, which runs learners one at
// a time between native runs.
const worker = new Worker(new URL('./bench-worker.js', import.meta.url), { type: 'module' });
const pending = new Map();
let next = 1;
worker.onmessage = (e) => {
  const job = pending.get(e.data.id);
  pending.delete(e.data.id);
  if (e.data.json) job.resolve(e.data.json);
  else job.reject(new Error(e.data.error));
};
window.benchRun = (request) => new Promise((resolve, reject) => {
  const id = next++;
  pending.set(id, { resolve, reject });
  worker.postMessage({ id, ...request });
});

const params = new URLSearchParams(location.search);
if (!params.has('manual')) {
  const out = document.getElementById('out');
  window.benchRun({ quick: params.has('quick'), only: params.get('only'), research: params.has('research') })
    .then((json) => { out.textContent = json; out.dataset.done = 'ok'; })
    .catch((err) => { out.textContent = `failed: ${err.message}`; out.dataset.done = 'error'; });
}
