// The benchmark worker: the same workloads as `burnin bench`, in wasm.
// Requests {id, quick, only, noLearners} → {id, json} or {id, error}.
import init, { benchFigures } from './pkg/burnin.js';

const ready = init();
self.onmessage = async (e) => {
  const { id, quick, only, noLearners } = e.data;
  try {
    await ready;
    self.postMessage({ id, json: benchFigures(Boolean(quick), only || undefined, Boolean(noLearners)) });
  } catch (err) {
    self.postMessage({ id, error: String((err && err.message) || err) });
  }
};
