// The benchmark worker: the same workloads as `burnin bench`, in wasm.
// Requests {id, quick, only, noLearners, research} → {id, json} or {id, error};
// {id, guest: {texts: [guest experiment, built-in experiment], source}} times
// the guest contract with a trivial learner module against the built-in
// uniform learner on the same workload → {id, json: {guest, builtin}} (episodes/s).
import init, { benchFigures, ExperimentRun } from './pkg/burnin.js';

const ready = init();

/** Episodes per second of one whole experiment (set-up excluded). */
function rate(text, guests) {
  const job = new ExperimentRun(text, 0, 1, guests);
  try {
    const t0 = performance.now();
    while (!job.advance(1e6)) { /* one worker, no progress to post */ }
    return job.totalEpisodes() / ((performance.now() - t0) / 1000);
  } finally {
    job.free();
  }
}

self.onmessage = async (e) => {
  const { id, quick, only, noLearners, research, guest } = e.data;
  try {
    await ready;
    if (guest) {
      const url = URL.createObjectURL(new Blob([guest.source], { type: 'text/javascript' }));
      const start = (await import(url)).default;
      URL.revokeObjectURL(url);
      const json = JSON.stringify({ guest: rate(guest.texts[0], { trivial: start }), builtin: rate(guest.texts[1], undefined) });
      self.postMessage({ id, json });
      return;
    }
    self.postMessage({ id, json: benchFigures(Boolean(quick), only || undefined, Boolean(noLearners), Boolean(research)) });
  } catch (err) {
    self.postMessage({ id, error: String((err && err.message) || err) });
  }
};
