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
      if (msg.type === 'progress') { job.onProgress?.(msg.done, msg.total, msg.at, msg.slice); return; }
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

  /**
   * Stops a worker that stopped answering and starts a fresh one; the
   * request `id` rejects with `why`, any others with a restart message.
   */
  replace(id, why) {
    this.worker.terminate();
    const jobs = [...this.pending.entries()];
    this.pending.clear();
    this.start();
    for (const [k, job] of jobs) job.reject(k === id ? why : new Error('a compute worker was restarted'));
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

/**
 * How long and how much memory the experiment `text` will take on the
 * pool, and whether that is over `budget` seconds: {ok, estimate: {seconds,
 * at_least, bytes, threads, learners}, words, over}, from the core's runner
 * (which times each learner for about a second). When a single episode
 * takes longer than `ESTIMATE_WAIT_MS`, the worker is replaced and the
 * runner's lower bound for that wait is the answer (`at_least`).
 */
export async function estimateRun(text, workers = POOL_SIZE, budget = undefined) {
  const job = quick.request('estimate', { text, workers, budget });
  let timer;
  const late = new Promise((resolve) => { timer = setTimeout(() => resolve(null), ESTIMATE_WAIT_MS); });
  const r = await Promise.race([job.promise, late]);
  clearTimeout(timer);
  if (r) return r;
  quick.replace(job.id, new Error('the estimate took too long'));
  job.promise.catch(() => {});
  return quick.request('late-estimate', { text, workers, waited: ESTIMATE_WAIT_MS / 1000, budget }).promise;
}
/** How long the page waits for an estimate before it replaces the worker timing it. */
const ESTIMATE_WAIT_MS = 5000;

/** A fresh base seed drawn from the browser's random source (getrandom in the core's bindings). */
export const freshSeed = () => quick.request('fresh-seed', {}).promise;

/** The core's catalogues of algorithms and generators, and its file limits. */
export const catalogue = () => quick.request('catalogue', {}).promise;

/** What a file is, read by the core: {ok, kind: 'model' | 'experiment' | 'results', …} or problems. */
export const readDocument = (text) => quick.request('read-document', { text }).promise;

/** The model's text with its graph layout replaced (positions: [[x, y], …]), or problems. */
export const withLayout = (text, positions) => quick.request('with-layout', { text, positions: new Float64Array(positions.flat()) }).promise;

/** A generated model file's text (or problems) from a generator object. */
export const generate = (spec) => quick.request('generate', { spec: JSON.stringify(spec) }).promise;

/** How long a worker running a guest learner may stay silent, in ms. */
let guestTimeoutMs = 10000;
/** For the browser tests: a shorter wait for a guest that never answers. */
export function setGuestTimeoutForTest(ms) { guestTimeoutMs = ms; }

/** A worker stopped because a guest learner never answered. */
class Hung extends Error {
  constructor(at, ms) {
    super('hung');
    this.at = at;
    this.ms = ms;
  }
}

/** Why a silent worker was stopped when the user cancelled. */
const CANCELLED = new Error('cancelled');

/** Whether a user's learner module exports a learner: {ok, message}. Runs it in a throwaway worker. */
export function checkGuest(source) {
  const c = new Client();
  const job = c.request('check-guest', { source });
  const timer = setTimeout(() => c.replace(job.id, new Error(`the module did not finish loading within ${guestTimeoutMs / 1000} s`)), guestTimeoutMs);
  return job.promise.finally(() => { clearTimeout(timer); c.worker.terminate(); });
}

/**
 * Runs an experiment file's text on the pool. Returns {promise, cancel,
 * workers}; the promise resolves to {json, csv}, to {cancelled: true, done,
 * total}, or to problems {ok: false}. The core's runner plans the run
 * (`plan-run`: which shard each worker runs, at most one worker per run);
 * this only posts each lane to its worker, sums their progress and hands
 * their shards to the core to merge. `guests` ([{name, source}]) are the
 * user's learner modules the experiment names: they run only in the pool's
 * workers. A worker whose guest stays silent longer than the guest timeout
 * is replaced, and its shard run again without that learner (the core
 * records the fault, listed in the results); the other learners' results
 * stay. `workers` is the pool's size until the plan is known, then its
 * number of lanes.
 */
export function runExperiment(text, onProgress, workers = POOL_SIZE, guests = []) {
  /** The core's plan: [{shard, of}], one lane per worker. */
  let lanes = null;
  const done = [], total = [];
  /** Per learner index, {episodes, ms} measured so far over all workers. */
  const measured = [];
  const sum = (xs) => xs.reduce((a, b) => a + b, 0);
  const report = () => onProgress?.(sum(done), sum(total), measured);
  let stopped = false, cancelled = false;
  /** Per lane: its request and when its worker last spoke. */
  const current = [];
  const shard = (i, skip) => {
    const c = pool[i];
    let last = performance.now(), at = null;
    const job = c.request('run', { text, shard: lanes[i].shard, of: lanes[i].of, guests, skip }, (d, t, where, slice) => {
      done[i] = d; total[i] = t; last = performance.now();
      if (where) at = where;
      if (slice && slice.episodes > 0) {
        const m = (measured[slice.learner] ||= { episodes: 0, ms: 0 });
        m.episodes += slice.episodes;
        m.ms += slice.ms;
      }
      report();
    });
    current[i] = { job, quiet: () => performance.now() - last, stop: (why) => c.replace(job.id, why) };
    const watch = guests.length && setInterval(() => {
      const quiet = performance.now() - last;
      if (quiet > guestTimeoutMs && at) c.replace(job.id, new Hung(at, quiet));
    }, Math.min(500, guestTimeoutMs / 4));
    const settle = () => { clearInterval(watch); current[i].settled = true; };
    return job.promise.then(
      (r) => { settle(); return r; },
      (err) => {
        settle();
        if (cancelled && (err instanceof Hung || err === CANCELLED)) return { cancelled: true };
        if (!(err instanceof Hung) || stopped) throw err;
        const [learner, seedIndex, episodes] = err.at;
        return shard(i, [...skip, { learner, seed_index: seedIndex, episodes, seconds: err.ms / 1000 }]);
      },
    );
  };
  const cancel = () => {
    cancelled = true;
    for (const s of current) s?.job.cancel();
    // A worker that has not answered the cancel after a few slices is inside
    // a guest's call that does not return: stop it.
    if (guests.length) {
      setTimeout(() => {
        for (const s of current) if (s && !s.settled && s.quiet() > 300) s.stop(CANCELLED);
      }, 400);
    }
  };
  const promise = (async () => {
    const plan = await quick.request('plan-run', { text, workers }).promise;
    if (plan.ok === false) return plan;
    lanes = plan.lanes;
    if (cancelled) return { cancelled: true, done: 0, total: 0 };
    while (pool.length < lanes.length) pool.push(new Client());
    for (let i = 0; i < lanes.length; i++) { done[i] = 0; total[i] = 0; }
    const jobs = lanes.map((_, i) => shard(i, []));
    let results;
    try {
      results = await Promise.all(jobs);
    } catch (err) {
      stopped = true;
      cancel();
      throw err;
    }
    const bad = results.find((r) => r && r.ok === false);
    if (bad) return bad;
    if (results.some((r) => r && r.cancelled)) {
      return { cancelled: true, done: sum(done), total: sum(total) };
    }
    return quick.request('merge', { shards: results }).promise;
  })();
  return { promise, cancel, get workers() { return lanes ? lanes.length : workers; } };
}
