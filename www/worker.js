// The compute worker: owns the wasm core; never touches the DOM.
// Requests {type, id, ...}:
//   solve {text}       → done {result}            (a model file's solution and canonical text, without Q*, or problems)
//   q-step {h}         → done {result: Float64Array}  (Q* of step h of the last model solved)
//   check {text}       → done {result}            (a model's summary or problems)
//   check-experiment {text} → done {result}       ({ok: true} or problems)
//   generate {spec}    → done {result}            (a model file's text or problems)
//   run {text, shard, of} → progress {done, total}…, then done {result: shard file text},
//                        or error {problems} for a bad experiment
//   merge {shards}     → done {result: {json, csv}} or problems
//   catalogue          → done {result}            (algorithms, generators, limits: src/catalogue.rs)
//   read-document {text} → done {result}          (what a file is, read by the core)
//   with-layout {text, positions} → done {result} (the model's text with a new layout, or problems)
//   cancel {id}        → the run with that id stops and answers cancelled
import init, { solveModel, checkModel, checkExperiment, generateModel, mergeShards, catalogue, readDocument, withLayout, ExperimentRun } from './pkg/burnin.js';

const ready = init();
const cancelled = new Set();
/** Q* of the last model solved successfully, kept here for `q-step`. */
let solved = null;
/** Milliseconds of work between looks at the message queue. */
const SLICE_MS = 20;

const pause = () => new Promise((resolve) => setTimeout(resolve, 0));

async function run(id, text, shard, of) {
  let job;
  try {
    job = new ExperimentRun(text, shard, of);
  } catch (problems) {
    self.postMessage({ type: 'error', id, problems });
    return;
  }
  let chunk = 64;
  const total = job.totalEpisodes();
  try {
    for (;;) {
      if (cancelled.delete(id)) {
        self.postMessage({ type: 'cancelled', id, done: job.episodesDone(), total });
        return;
      }
      const t0 = performance.now();
      const finished = job.advance(chunk);
      const dt = performance.now() - t0;
      // Aim each slice at SLICE_MS so a cancel is heard quickly.
      chunk = Math.max(1, Math.min(chunk * 4, Math.round(chunk * SLICE_MS / Math.max(dt, 0.5))));
      self.postMessage({ type: 'progress', id, done: job.episodesDone(), total });
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
      await run(id, event.data.text, event.data.shard, event.data.of);
    } else if (type === 'catalogue') {
      self.postMessage({ type: 'done', id, result: catalogue() });
    } else if (type === 'read-document') {
      self.postMessage({ type: 'done', id, result: readDocument(event.data.text) });
    } else if (type === 'with-layout') {
      self.postMessage({ type: 'done', id, result: withLayout(event.data.text, event.data.positions) });
    } else if (type === 'merge') {
      self.postMessage({ type: 'done', id, result: mergeShards(event.data.shards) });
    } else {
      self.postMessage({ type: 'error', id, message: `unknown request ${type}` });
    }
  } catch (err) {
    self.postMessage({ type: 'error', id, message: String((err && err.message) || err) });
  }
};
