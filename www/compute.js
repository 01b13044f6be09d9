// Promise-based clients for the compute workers: one for quick requests, and
// a pool sized to the machine for experiments, whose runs are split into
// shards (one per worker) and merged by the core into exactly what one
// worker would have produced.
const QUICK = new URL('./worker.js', import.meta.url);
/** Workers in the experiment pool: the machine's cores, at most 8. */
export const POOL_SIZE = Math.max(1, Math.min(8, navigator.hardwareConcurrency || 2));

class Client {
  constructor() {
    this.pending = new Map();
    this.next = 1;
    this.start();
  }

  /** (Re)starts the worker; a worker that failed is replaced by a fresh one. */
  start() {
    this.worker = new Worker(QUICK, { type: 'module' });
    this.worker.onmessage = (event) => {
      const msg = event.data;
      const job = this.pending.get(msg.id);
      if (!job) return;
      if (msg.type === 'progress') { job.onProgress?.(msg.done, msg.total); return; }
      this.pending.delete(msg.id);
      if (msg.type === 'done') job.resolve(msg.result);
      else if (msg.type === 'cancelled') job.resolve({ cancelled: true, done: msg.done, total: msg.total });
      else if (msg.problems) job.resolve(msg.problems);
      else job.reject(new Error(msg.message));
    };
    this.worker.onerror = (event) => {
      event.preventDefault();
      const why = event.message || 'a compute worker failed';
      this.worker.terminate();
      this.start();
      for (const job of this.pending.values()) job.reject(new Error(`a compute worker stopped (${why}); it has been restarted`));
      this.pending.clear();
      onRestart?.(why);
    };
  }
  request(type, payload, onProgress) {
    const id = this.next++;
    const promise = new Promise((resolve, reject) => {
      this.pending.set(id, { resolve, reject, onProgress });
      this.worker.postMessage({ type, id, ...payload });
    });
    return { id, promise, cancel: () => this.worker.postMessage({ type: 'cancel', target: id }) };
  }
}

let onRestart = null;
/** Tells `f(reason)` whenever a failed worker is replaced. */
export function onWorkerRestart(f) { onRestart = f; }

const quick = new Client();
const pool = [];

/** Fault injection for the browser tests: makes pool worker `i` fail as a crash would. */
export function crashPoolWorkerForTest(i = 0) { pool[i]?.worker.postMessage({ type: 'crash' }); }

/** Starts the experiment pool ahead of need, each worker loading the core. */
export function warmPool() {
  while (pool.length < POOL_SIZE) pool.push(new Client());
  return Promise.all(pool.map((c) => c.request('check', { text: '{}' }).promise));
}

/** Q* of step h (Float64Array, S·A) of the model solved last. */
export const qStep = (h) => quick.request('q-step', { h }).promise;

/** Parses, validates and solves a model file's text. */
export const solve = (text) => quick.request('solve', { text }).promise;

/** Checks a model file's text: its summary, or its problems. */
export const check = (text) => quick.request('check', { text }).promise;

/** Checks an experiment file's text: {ok: true} or its problems. */
export const checkExperiment = (text) => quick.request('check-experiment', { text }).promise;

/** The core's catalogues of algorithms and generators, and its file limits. */
export const catalogue = () => quick.request('catalogue', {}).promise;

/** What a file is, read by the core: {ok, kind: 'model' | 'experiment' | 'results', …} or problems. */
export const readDocument = (text) => quick.request('read-document', { text }).promise;

/** The model's text with its graph layout replaced (positions: [[x, y], …]), or problems. */
export const withLayout = (text, positions) => quick.request('with-layout', { text, positions: new Float64Array(positions.flat()) }).promise;

/** A generated model file's text (or problems) from a generator object. */
export const generate = (spec) => quick.request('generate', { spec: JSON.stringify(spec) }).promise;

/**
 * Runs an experiment file's text on the pool. Returns {promise, cancel,
 * workers}; the promise resolves to {json, csv}, to {cancelled: true, done,
 * total}, or to problems {ok: false}.
 */
export function runExperiment(text, onProgress, workers = POOL_SIZE) {
  while (pool.length < workers) pool.push(new Client());
  const done = new Array(workers).fill(0), total = new Array(workers).fill(0);
  const report = () => onProgress?.(done.reduce((a, b) => a + b, 0), total.reduce((a, b) => a + b, 0));
  const jobs = pool.slice(0, workers).map((c, i) => c.request('run', { text, shard: i, of: workers }, (d, t) => { done[i] = d; total[i] = t; report(); }));
  const cancel = () => jobs.forEach((j) => j.cancel());
  const promise = (async () => {
    let results;
    try {
      results = await Promise.all(jobs.map((j) => j.promise));
    } catch (err) {
      cancel();
      throw err;
    }
    const bad = results.find((r) => r && r.ok === false);
    if (bad) return bad;
    if (results.some((r) => r && r.cancelled)) {
      return { cancelled: true, done: done.reduce((a, b) => a + b, 0), total: total.reduce((a, b) => a + b, 0) };
    }
    return quick.request('merge', { shards: results }).promise;
  })();
  return { promise, cancel, workers };
}
