// The compute worker: owns the wasm core; never touches the DOM.
// Protocol: {type: 'solve' | 'check', id, text} → {type: 'done' | 'error', id, ...}.
import init, { solveModel, checkModel } from './pkg/burnin.js';

const ready = init();

self.onmessage = async (event) => {
  const { type, id, text } = event.data;
  try {
    await ready;
    if (type === 'solve') {
      const result = solveModel(text);
      const transfer = result.ok ? [result.v.buffer, result.q.buffer, result.gaps.buffer, result.policy.buffer] : [];
      self.postMessage({ type: 'done', id, result }, transfer);
    } else if (type === 'check') {
      self.postMessage({ type: 'done', id, result: checkModel(text) });
    } else {
      self.postMessage({ type: 'error', id, message: `unknown request ${type}` });
    }
  } catch (err) {
    self.postMessage({ type: 'error', id, message: String(err && err.message || err) });
  }
};
