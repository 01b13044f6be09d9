// A promise-based client for the compute worker.
const worker = new Worker(new URL('./worker.js', import.meta.url), { type: 'module' });
const pending = new Map();
let nextId = 1;

worker.onmessage = (event) => {
  const { type, id } = event.data;
  const job = pending.get(id);
  if (!job) return;
  pending.delete(id);
  if (type === 'done') job.resolve(event.data.result);
  else job.reject(new Error(event.data.message));
};

worker.onerror = (event) => {
  for (const job of pending.values()) job.reject(new Error(event.message || 'the compute worker failed'));
  pending.clear();
};

function request(type, payload) {
  const id = nextId++;
  return new Promise((resolve, reject) => {
    pending.set(id, { resolve, reject });
    worker.postMessage({ type, id, ...payload });
  });
}

/** Parses, validates and solves a model file's text in the worker. */
export const solve = (text) => request('solve', { text });
