// The benchmark worker: the same workloads as `burnin bench`, in wasm.
import init, { benchFigures } from './pkg/burnin.js';

const ready = init();
self.onmessage = async (e) => {
  try {
    await ready;
    self.postMessage({ json: benchFigures(Boolean(e.data.quick), e.data.only || undefined) });
  } catch (err) {
    self.postMessage({ error: String((err && err.message) || err) });
  }
};
