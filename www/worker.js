// The compute worker: owns the wasm core; never touches the DOM.
// Requests {type, id, ...}:
//   solve {text}       → done {result}            (a model file's solution and canonical text, without Q*, or problems)
//   q-step {h}         → done {result: Float64Array}  (Q* of step h of the last model solved)
//   check {text}       → done {result}            (a model's summary or problems)
//   check-experiment {text} → done {result}       ({ok: true} or problems)
//   generate {spec}    → done {result}            (a model file's text or problems)
//   run {text, shard, of, guests, skip} → progress {done, total, at}…, then done {result: shard file text},
//                        or error {problems} for a bad experiment. shard, of: a lane of the core's
//                        plan (plan-run). guests: [{name, source}], the user's learner modules (run
//                        here, never on the page's thread); skip: [{learner, seed_index, episodes,
//                        seconds}], learners already given up on (silent that long after that many
//                        episodes).
//                        at: [learner, seed index, episodes done] of the run in progress; slice:
//                        {learner, episodes, ms} of the slice just run (one run per slice).
//   check-guest {source} → done {result: {ok, message}}  (whether a module exports a learner)
//   merge {shards}     → done {result: {json, csv}} or problems
//   plan-run {text, workers} → done {result: {ok, lanes: [{shard, of}]}} or problems (the core's runner)
//   estimate {text, workers, budget} → done {result: {ok, estimate, words, over}} or problems
//   late-estimate {text, workers, waited, budget} → the same, when the page stopped waiting for `estimate`
//   catalogue          → done {result}            (algorithms, generators, limits: src/catalogue.rs)
//   read-document {text} → done {result}          (what a file is, read by the core)
//   with-layout {text, positions} → done {result} (the model's text with a new layout, or problems)
//   fresh-seed         → done {result: a base seed}   (from Crypto.getRandomValues, through the core)
//   cancel {id}        → the run with that id stops and answers cancelled
import init, { solveModel, checkModel, checkExperiment, generateModel, mergeShards, catalogue, readDocument, withLayout, estimateRun, lateEstimate, planRun, freshSeed, ExperimentRun } from './pkg/burnin.js';

const ready = init();
const cancelled = new Set();
/** Q* of the last model solved successfully, kept here for `q-step`. */
let solved = null;
/** Milliseconds of work between looks at the message queue. */
const SLICE_MS = 20;

const pause = () => new Promise((resolve) => setTimeout(resolve, 0));

/** A user's learner module, imported from its text: its default export. */
async function importGuest(source) {
  const url = URL.createObjectURL(new Blob([source], { type: 'text/javascript' }));
  try {
    const mod = await import(url);
    if (typeof mod.default !== 'function') throw new Error('the module has no default export function start(intro) (see examples/uniform.mjs)');
    return mod.default;
  } finally {
    URL.revokeObjectURL(url);
  }
}

async function run(id, text, shard, of, guests = [], skip = []) {
  let job;
  let starts;
  try {
    starts = {};
    for (const g of guests) starts[g.name] = await importGuest(g.source);
  } catch (err) {
    self.postMessage({ type: 'error', id, message: `your learner could not be loaded: ${err.message}` });
    return;
  }
  try {
    job = new ExperimentRun(text, shard, of, guests.length ? starts : undefined);
  } catch (problems) {
    self.postMessage({ type: 'error', id, problems });
    return;
  }
  for (const f of skip) job.gaveNoAnswer(f.learner, f.seed_index, f.episodes, f.seconds);
  let chunk = 64;
  const total = job.totalEpisodes();
  const guarded = job.hasGuests();
  try {
    for (;;) {
      if (cancelled.delete(id)) {
        self.postMessage({ type: 'cancelled', id, done: job.episodesDone(), total });
        return;
      }
      const t0 = performance.now();
      // Say which run is next before stepping it: with guest learners, if a
      // guest never answers, the page's watchdog knows whose run hung. One
      // run per slice, so each slice's time is one learner's (for the
      // estimate of the time left).
      const at = job.current();
      if (guarded) self.postMessage({ type: 'progress', id, done: job.episodesDone(), total, at });
      const before = job.episodesDone();
      const finished = job.advanceOneRun(chunk);
      const dt = performance.now() - t0;
      const slice = at ? { learner: at[0], episodes: job.episodesDone() - before, ms: dt } : null;
      // Aim each slice at SLICE_MS so a cancel is heard quickly.
      chunk = Math.max(1, Math.min(chunk * 4, Math.round(chunk * SLICE_MS / Math.max(dt, 0.5))));
      self.postMessage({ type: 'progress', id, done: job.episodesDone(), total, at: job.current(), slice });
      if (finished) break;
      await pause();
    }
    self.postMessage({ type: 'done', id, result: job.shardJson() });
  } finally {
    job.free();
  }
}

self.onmessage = async (event) => {
  const { type, id } = event.data;
  if (type === 'cancel') { cancelled.add(event.data.target); return; }
  // Fault injection for the browser tests: fail as an uncaught error would.
  if (type === 'crash') { setTimeout(() => { throw new Error('injected fault'); }, 0); return; }
  try {
    await ready;
    if (type === 'solve') {
      const result = solveModel(event.data.text);
      if (result.ok) {
        solved?.free();
        solved = result.solved;
        delete result.solved;
      }
      const transfer = result.ok ? [result.v.buffer, result.policy.buffer] : [];
      self.postMessage({ type: 'done', id, result }, transfer);
    } else if (type === 'q-step') {
      const q = solved.qStep(event.data.h);
      self.postMessage({ type: 'done', id, result: q }, [q.buffer]);
    } else if (type === 'check') {
      self.postMessage({ type: 'done', id, result: checkModel(event.data.text) });
    } else if (type === 'check-experiment') {
      self.postMessage({ type: 'done', id, result: checkExperiment(event.data.text) });
    } else if (type === 'generate') {
      self.postMessage({ type: 'done', id, result: generateModel(event.data.spec) });
    } else if (type === 'run') {
      await run(id, event.data.text, event.data.shard, event.data.of, event.data.guests, event.data.skip);
    } else if (type === 'check-guest') {
      let result;
      try { await importGuest(event.data.source); result = { ok: true }; } catch (err) { result = { ok: false, message: String(err?.message || err) }; }
      self.postMessage({ type: 'done', id, result });
    } else if (type === 'catalogue') {
      self.postMessage({ type: 'done', id, result: catalogue() });
    } else if (type === 'read-document') {
      self.postMessage({ type: 'done', id, result: readDocument(event.data.text) });
    } else if (type === 'with-layout') {
      self.postMessage({ type: 'done', id, result: withLayout(event.data.text, event.data.positions) });
    } else if (type === 'plan-run') {
      self.postMessage({ type: 'done', id, result: planRun(event.data.text, event.data.workers) });
    } else if (type === 'estimate') {
      const { text, workers, budget } = event.data;
      self.postMessage({ type: 'done', id, result: estimateRun(text, workers, budget) });
    } else if (type === 'late-estimate') {
      const { text, workers, waited, budget } = event.data;
      self.postMessage({ type: 'done', id, result: lateEstimate(text, workers, waited, budget) });
    } else if (type === 'fresh-seed') {
      self.postMessage({ type: 'done', id, result: freshSeed() });
    } else if (type === 'merge') {
      self.postMessage({ type: 'done', id, result: mergeShards(event.data.shards) });
    } else {
      self.postMessage({ type: 'error', id, message: `unknown request ${type}` });
    }
  } catch (err) {
    self.postMessage({ type: 'error', id, message: String((err && err.message) || err) });
  }
};
