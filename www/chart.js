// Charts: one renderer drawing through a "pen", with two pens — a canvas
// (screen and PNG) and SVG text (SVG export) — so both exports show the same
// picture. Data to pixels and back is returned for hover read-outs.

/** Series colours (our own palette; ink-friendly on paper). */
export const PALETTE = ['#1f6f78', '#cb8019', '#ad75f4', '#573e0c', '#53249a', '#80986e', '#ec55be', '#820f44'];

const FONT = 'system-ui, -apple-system, "Segoe UI", Roboto, sans-serif';
const measureCtx = document.createElement('canvas').getContext('2d');

function measure(text, size, weight = 400) {
  measureCtx.font = `${weight} ${size}px ${FONT}`;
  return measureCtx.measureText(text).width;
}

export class CanvasPen {
  constructor(canvas, cssWidth, cssHeight) {
    const dpr = window.devicePixelRatio || 1;
    canvas.width = Math.round(cssWidth * dpr);
    canvas.height = Math.round(cssHeight * dpr);
    canvas.style.width = `${cssWidth}px`;
    canvas.style.height = `${cssHeight}px`;
    this.ctx = canvas.getContext('2d');
    this.ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    this.ctx.clearRect(0, 0, cssWidth, cssHeight);
  }
  rect(x, y, w, h, { fill, stroke, width = 1 }) {
    const c = this.ctx;
    if (fill) { c.fillStyle = fill; c.fillRect(x, y, w, h); }
    if (stroke) { c.strokeStyle = stroke; c.lineWidth = width; c.strokeRect(x, y, w, h); }
  }
  line(pts, { color, width = 1.5, dash = null, alpha = 1 }) {
    if (pts.length < 2) return;
    const c = this.ctx;
    c.save();
    c.globalAlpha = alpha;
    c.strokeStyle = color;
    c.lineWidth = width;
    c.setLineDash(dash || []);
    c.beginPath();
    c.moveTo(pts[0][0], pts[0][1]);
    for (let i = 1; i < pts.length; i++) c.lineTo(pts[i][0], pts[i][1]);
    c.stroke();
    c.restore();
  }
  area(upper, lower, { color, alpha }) {
    if (upper.length < 2) return;
    const c = this.ctx;
    c.save();
    c.globalAlpha = alpha;
    c.fillStyle = color;
    c.beginPath();
    c.moveTo(upper[0][0], upper[0][1]);
    for (const p of upper.slice(1)) c.lineTo(p[0], p[1]);
    for (const p of lower.slice().reverse()) c.lineTo(p[0], p[1]);
    c.closePath();
    c.fill();
    c.restore();
  }
  text(x, y, s, { size = 12, color = '#1e282d', align = 'left', baseline = 'alphabetic', weight = 400, angle = 0 }) {
    const c = this.ctx;
    c.save();
    c.font = `${weight} ${size}px ${FONT}`;
    c.fillStyle = color;
    c.textAlign = align;
    c.textBaseline = baseline;
    c.translate(x, y);
    if (angle) c.rotate(angle);
    c.fillText(s, 0, 0);
    c.restore();
  }
  clip(x, y, w, h, body) {
    const c = this.ctx;
    c.save();
    c.beginPath();
    c.rect(x, y, w, h);
    c.clip();
    body();
    c.restore();
  }
}

const esc = (s) => String(s).replace(/[&<>"']/g, (ch) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' }[ch]));
const f = (x) => (Math.round(x * 100) / 100).toString();

export class SvgPen {
  constructor(w, h) { this.w = w; this.h = h; this.parts = []; this.clipId = 0; }
  rect(x, y, w, h, { fill, stroke, width = 1 }) {
    this.parts.push(`<rect x="${f(x)}" y="${f(y)}" width="${f(w)}" height="${f(h)}" fill="${fill || 'none'}"${stroke ? ` stroke="${stroke}" stroke-width="${width}"` : ''}/>`);
  }
  line(pts, { color, width = 1.5, dash = null, alpha = 1 }) {
    if (pts.length < 2) return;
    const d = pts.map((p, i) => `${i ? 'L' : 'M'}${f(p[0])},${f(p[1])}`).join('');
    this.parts.push(`<path d="${d}" fill="none" stroke="${color}" stroke-width="${width}"${dash ? ` stroke-dasharray="${dash.join(',')}"` : ''}${alpha < 1 ? ` stroke-opacity="${alpha}"` : ''}/>`);
  }
  area(upper, lower, { color, alpha }) {
    if (upper.length < 2) return;
    const pts = upper.concat(lower.slice().reverse());
    const d = pts.map((p, i) => `${i ? 'L' : 'M'}${f(p[0])},${f(p[1])}`).join('') + 'Z';
    this.parts.push(`<path d="${d}" fill="${color}" fill-opacity="${alpha}" stroke="none"/>`);
  }
  text(x, y, s, { size = 12, color = '#1e282d', align = 'left', baseline = 'alphabetic', weight = 400, angle = 0 }) {
    const anchor = { left: 'start', center: 'middle', right: 'end' }[align];
    const dy = { top: '0.8em', middle: '0.35em', alphabetic: '0', bottom: '0' }[baseline] || '0';
    const rot = angle ? ` transform="rotate(${(angle * 180) / Math.PI} ${f(x)} ${f(y)})"` : '';
    this.parts.push(`<text x="${f(x)}" y="${f(y)}" dy="${dy}" font-family="${esc(FONT)}" font-size="${size}" font-weight="${weight}" fill="${color}" text-anchor="${anchor}"${rot}>${esc(s)}</text>`);
  }
  clip(x, y, w, h, body) {
    const id = `c${this.clipId++}`;
    this.parts.push(`<clipPath id="${id}"><rect x="${f(x)}" y="${f(y)}" width="${f(w)}" height="${f(h)}"/></clipPath><g clip-path="url(#${id})">`);
    body();
    this.parts.push('</g>');
  }
  toString() {
    return `<svg xmlns="http://www.w3.org/2000/svg" width="${this.w}" height="${this.h}" viewBox="0 0 ${this.w} ${this.h}">${this.parts.join('')}</svg>`;
  }
}

function niceStep(span, target) {
  const raw = span / Math.max(1, target);
  const mag = 10 ** Math.floor(Math.log10(raw));
  const n = raw / mag;
  return (n < 1.5 ? 1 : n < 3 ? 2 : n < 7 ? 5 : 10) * mag;
}

function linearTicks(lo, hi, target) {
  const step = niceStep(hi - lo || 1, target);
  const out = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

function logTicks(lo, hi) {
  const out = [];
  for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
    const v = 10 ** e;
    if (v >= lo * 0.999 && v <= hi * 1.001) out.push(v);
  }
  if (out.length < 3) {
    for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
      for (const m of [2, 5]) { const v = m * 10 ** e; if (v >= lo && v <= hi) out.push(v); }
    }
    out.sort((a, b) => a - b);
  }
  return out;
}

/** A tick label: short, with a true minus sign. */
export function tickLabel(v) {
  const a = Math.abs(v);
  let s;
  if (a === 0) s = '0';
  else if (a >= 1e6 || a < 1e-3) s = v.toExponential(0).replace('e+', 'e');
  else if (a >= 1000) s = (v / 1000).toFixed(a >= 1e4 ? 0 : 1).replace(/\.0$/, '') + 'k';
  else s = String(Number(v.toPrecision(3)));
  return s.replace('-', '−');
}

/** `text` cut with an ellipsis to fit `maxW` pixels at `size`. */
function fit(text, size, maxW, weight = 400) {
  if (measure(text, size, weight) <= maxW) return text;
  let lo = 0, hi = text.length;
  while (lo < hi) {
    const mid = Math.ceil((lo + hi) / 2);
    if (measure(`${text.slice(0, mid)}…`, size, weight) <= maxW) lo = mid; else hi = mid - 1;
  }
  return `${text.slice(0, lo)}…`;
}

/** `text` broken into lines of at most `maxW` pixels at `size`. */
function wrap(text, size, maxW) {
  const lines = [];
  let line = '';
  for (const word of text.split(/\s+/).filter(Boolean)) {
    const next = line ? `${line} ${word}` : word;
    if (line && measure(next, size) > maxW) { lines.push(line); line = word; } else line = next;
  }
  if (line) lines.push(line);
  return lines;
}

/**
 * Draws `spec` with `pen` in a w×h box; `scale` enlarges type (presentation).
 * spec: {title, xLabel, yLabel, log, series: [{label, color, x, y, lo?, hi?,
 * dash?, width?, legend?}], bars?: true for error bars at points, caption?:
 * text printed under the chart (exports carry their explanation with them)}
 * Returns the layout for hover: {x0, x1, y0, y1, sx, sy, xs}.
 */
export function drawChart(pen, w, h, spec, scale = 1) {
  const fs = 12 * scale;
  const pad = 10 * scale;
  pen.rect(0, 0, w, h, { fill: '#fffdf8' });
  const visible = (x, y) => !spec.log || (x > 0 && y > 0);
  let xmin = Infinity, xmax = -Infinity, ymin = Infinity, ymax = -Infinity;
  for (const s of spec.series) {
    for (let i = 0; i < s.x.length; i++) {
      const ys = [s.y[i], s.lo ? s.lo[i] : s.y[i], s.hi ? s.hi[i] : s.y[i]];
      for (const y of ys) {
        if (!Number.isFinite(y) || !visible(s.x[i], y)) continue;
        xmin = Math.min(xmin, s.x[i]); xmax = Math.max(xmax, s.x[i]);
        ymin = Math.min(ymin, y); ymax = Math.max(ymax, y);
      }
    }
  }
  if (!Number.isFinite(xmin)) { xmin = 1; xmax = 10; ymin = 1; ymax = 10; }
  if (!spec.log) { ymin = Math.min(0, ymin); }
  if (xmax === xmin) xmax = xmin + 1;
  if (ymax === ymin) ymax = ymin + 1;
  if (!spec.log) ymax += (ymax - ymin) * 0.04;
  const legendItems = spec.series.filter((s) => s.legend !== false);
  const legendW = Math.min(w * 0.38, Math.max(0, ...legendItems.map((s) => measure(s.label, fs))) + 34 * scale);
  const titleH = spec.title ? fs * 1.9 : pad;
  const captionLines = spec.caption ? wrap(spec.caption, fs * 0.95, w - 2 * pad) : [];
  const captionH = captionLines.length * fs * 1.3;
  const x0 = pad + fs * 4.6, x1 = w - legendW - pad, y0 = titleH + pad * 0.5, y1 = h - fs * 3.4 - captionH;
  captionLines.forEach((line, i) => pen.text(pad, h - captionH + fs * (0.9 + 1.3 * i) - pad * 0.3, line, { size: fs * 0.95, color: '#5d676b' }));
  const L = spec.log ? Math.log10 : (v) => v;
  const [lx0, lx1, ly0, ly1] = [L(xmin), L(xmax), L(ymin), L(ymax)];
  const sx = (x) => x0 + ((L(x) - lx0) / (lx1 - lx0)) * (x1 - x0);
  const sy = (y) => y1 - ((L(y) - ly0) / (ly1 - ly0)) * (y1 - y0);
  if (spec.title) {
    // A long title shrinks a little, then is cut, rather than run off the chart.
    let size = fs * 1.25;
    while (size > fs && measure(spec.title, size, 600) > w - 2 * pad) size *= 0.95;
    pen.text(pad, pad + fs, fit(spec.title, size, w - 2 * pad, 600), { size, weight: 600 });
  }
  // Grid and ticks.
  const xt = spec.log ? logTicks(xmin, xmax) : linearTicks(xmin, xmax, Math.max(2, (x1 - x0) / (70 * scale)));
  const yt = spec.log ? logTicks(ymin, ymax) : linearTicks(ymin, ymax, Math.max(2, (y1 - y0) / (45 * scale)));
  for (const v of xt) {
    pen.line([[sx(v), y0], [sx(v), y1]], { color: '#e7e0d0', width: 1 });
    pen.text(sx(v), y1 + fs * 1.3, tickLabel(v), { size: fs, align: 'center', color: '#5d676b' });
  }
  for (const v of yt) {
    pen.line([[x0, sy(v)], [x1, sy(v)]], { color: '#e7e0d0', width: 1 });
    pen.text(x0 - fs * 0.5, sy(v), tickLabel(v), { size: fs, align: 'right', baseline: 'middle', color: '#5d676b' });
  }
  pen.rect(x0, y0, x1 - x0, y1 - y0, { stroke: '#b9b09c' });
  pen.text((x0 + x1) / 2, h - fs * 0.6, spec.xLabel, { size: fs, align: 'center' });
  pen.text(pad + fs * 0.4, (y0 + y1) / 2, spec.yLabel, { size: fs, align: 'center', baseline: 'top', angle: -Math.PI / 2 });
  // Series.
  pen.clip(x0, y0, x1 - x0, y1 - y0, () => {
    for (const s of spec.series) {
      const idx = s.x.map((_, i) => i).filter((i) => Number.isFinite(s.y[i]) && visible(s.x[i], s.y[i]));
      if (s.lo && s.hi && !spec.bars) {
        const ok = idx.filter((i) => visible(s.x[i], s.lo[i]) && visible(s.x[i], s.hi[i]));
        pen.area(ok.map((i) => [sx(s.x[i]), sy(s.hi[i])]), ok.map((i) => [sx(s.x[i]), sy(s.lo[i])]), { color: s.color, alpha: 0.16 });
      }
      const pts = idx.map((i) => [sx(s.x[i]), sy(s.y[i])]);
      pen.line(pts, { color: s.color, width: (s.width || 2) * scale, dash: s.dash ? s.dash.map((d) => d * scale) : null });
      if (spec.bars) {
        for (const i of idx) {
          const x = sx(s.x[i]);
          if (s.lo && s.hi) pen.line([[x, sy(Math.max(s.lo[i], spec.log ? ymin : -Infinity))], [x, sy(s.hi[i])]], { color: s.color, width: 1.5 * scale });
          pen.rect(x - 3 * scale, sy(s.y[i]) - 3 * scale, 6 * scale, 6 * scale, { fill: s.color });
        }
      }
    }
  });
  // Legend.
  let ly = y0 + fs * 0.5;
  for (const s of legendItems) {
    const lx = x1 + pad;
    pen.line([[lx, ly], [lx + 20 * scale, ly]], { color: s.color, width: (s.width || 2) * scale, dash: s.dash ? s.dash.map((d) => d * scale) : null });
    pen.text(lx + 26 * scale, ly, fit(s.label, fs, legendW - 30 * scale), { size: fs, baseline: 'middle' });
    ly += fs * 1.5;
  }
  const xs = spec.series.length ? spec.series[0].x : [];
  return { x0, x1, y0, y1, sx, sy, xs, log: spec.log, series: spec.series };
}

/** The index in `layout.xs` nearest to pixel column px, or -1 outside the plot. */
export function nearestIndex(layout, px, py) {
  if (px < layout.x0 || px > layout.x1 || py < layout.y0 || py > layout.y1) return -1;
  let best = -1, dist = Infinity;
  layout.xs.forEach((x, i) => {
    if (layout.log && x <= 0) return;
    const d = Math.abs(layout.sx(x) - px);
    if (d < dist) { dist = d; best = i; }
  });
  return best;
}
