// Runs the reference workloads in a worker and shows their figures.
const worker = new Worker(new URL('./bench-worker.js', import.meta.url), { type: 'module' });
worker.onmessage = (e) => {
  const out = document.getElementById('out');
  out.textContent = e.data.json || `failed: ${e.data.error}`;
  out.dataset.done = e.data.json ? 'ok' : 'error';
};
const params = new URLSearchParams(location.search);
worker.postMessage({ quick: params.has('quick'), only: params.get('only') });
