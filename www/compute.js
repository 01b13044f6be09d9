// A promise-based client for the compute worker.
const worker = new Worker(new URL('./worker.js', import.meta.url), { type: 'module' });
const pending = new Map();
let nextId = 1;

worker.onmessage = (event) => {
  const msg = event.data;
  const job = pending.get(msg.id);
  if (!job) return;
  if (msg.type === 'progress') { job.onProgress?.(msg.done, msg.total); return; }
  pending.delete(msg.id);
  if (msg.type === 'done') job.resolve(msg.result);
  else if (msg.type === 'cancelled') job.resolve({ cancelled: true, done: msg.done, total: msg.total });
  else if (msg.problems) job.resolve(msg.problems);
  else job.reject(new Error(msg.message));
};

worker.onerror = (event) => {
  for (const job of pending.values()) job.reject(new Error(event.message || 'the compute worker failed'));
  pending.clear();
};

function request(type, payload, onProgress) {
  const id = nextId++;
  const promise = new Promise((resolve, reject) => {
    pending.set(id, { resolve, reject, onProgress });
    worker.postMessage({ type, id, ...payload });
  });
  return { id, promise };
}

/** Parses, validates and solves a model file's text. */
export const solve = (text) => request('solve', { text }).promise;

/** Checks a model file's text: its summary, or its problems. */
export const check = (text) => request('check', { text }).promise;

/** A generated model file's text (or problems) from a generator object. */
export const generate = (spec) => request('generate', { spec: JSON.stringify(spec) }).promise;

/**
 * Runs an experiment file's text. Returns {promise, cancel}; the promise
 * resolves to {json, csv}, to {cancelled: true}, or to problems {ok: false}.
 */
export function runExperiment(text, onProgress) {
  const { id, promise } = request('run', { text }, onProgress);
  return { promise, cancel: () => worker.postMessage({ type: 'cancel', target: id }) };
}
