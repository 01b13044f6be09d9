// The charts, drawn by the core (src/chart) on the page's thread, where
// the canvases are: the same code that writes `burnin plot`'s SVG and PNG.
// The worker reads results files; this thread gets only the chart data
// (`chartText`: the curves, without the per-seed curves and regret maps).
import init, { ResultsChart, chartFont } from './pkg/burnin.js';

const ready = (async () => {
  await init();
  // The typeface the core measures text with, so the canvas draws what the layout planned.
  const face = new FontFace('BurninSans', chartFont());
  document.fonts.add(face);
  await face.load();
})();

/**
 * The core's chart, made again from its chart data after any failure: a
 * failure inside the core leaves its object borrowed, and every later call
 * on it would fail ("attempted to take ownership of Rust value while it was
 * borrowed") until a reload (#35). The failure is still thrown.
 */
class Chart {
  constructor(chartText) {
    this.text = chartText;
    this.inner = new ResultsChart(chartText);
  }
  call(f) {
    try {
      return f(this.inner);
    } catch (e) {
      try { this.inner.free(); } catch { /* borrowed: left to the collector */ }
      this.inner = new ResultsChart(this.text);
      throw e;
    }
  }
  views() { return this.call((c) => c.views()); }
  draw(canvas, options, scale) { return this.call((c) => c.draw(canvas, options, scale)); }
  readout(x, y) { return this.call((c) => c.readout(x, y)); }
  svg(options, width, height, scale) { return this.call((c) => c.svg(options, width, height, scale)); }
  caption(options) { return this.call((c) => c.caption(options)); }
  free() { try { this.inner.free(); } catch { /* already failed */ } }
}

/** The chart of chart data, once the core is loaded. */
export async function openChart(chartText) {
  await ready;
  return new Chart(chartText);
}

/**
 * Sizes `canvas` to cssW×cssH CSS pixels (cssW at most its box's width)
 * at the screen's pixel density
 * (sharp on high-density screens) and draws into it, type enlarged by
 * `typeScale`. Returns the core's {ok, series | message} and the ratio of
 * canvas to CSS pixels.
 */
export function drawInto(chart, canvas, options, cssW, cssH, typeScale = 1) {
  const ratio = window.devicePixelRatio || 1;
  // Never wider than the box it is in, which would cut its right side off
  // (at 360 px a results box is 278 px wide; #34).
  const room = canvas.parentElement?.clientWidth;
  if (room > 0) cssW = Math.min(cssW, room);
  canvas.width = Math.round(cssW * ratio);
  canvas.height = Math.round(cssH * ratio);
  canvas.style.width = `${cssW}px`;
  canvas.style.height = `${cssH}px`;
  try {
    const r = { ...chart.draw(canvas, options, ratio * typeScale), ratio };
    drawn.set(canvas, { texts: r.texts ?? [], plot: r.plot ?? null, ratio, width: canvas.width, height: canvas.height });
    return r;
  } catch (e) {
    drawn.delete(canvas);
    return { ok: false, message: `the chart could not be drawn: ${e?.message ?? e}`, ratio };
  }
}

/** What drawInto last drew in each canvas: the core's placed texts. */
const drawn = new WeakMap();

/**
 * The texts of the chart last drawn into `canvas`, as the core placed
 * them: `{text, full, left, top, right, bottom}` with the box of their ink
 * in canvas pixels (`full`: the whole text where `text` is shortened; the
 * hover shows it), the plot area's [left, top, right, bottom] in canvas
 * pixels, and the canvas's size and pixel ratio; null if none.
 */
export function drawnTexts(canvas) {
  return drawn.get(canvas) ?? null;
}

/** Size and type scale of exported pictures (as `burnin plot`'s defaults). */
export const EXPORT = { width: 1280, height: 720, scale: 1.25 };
