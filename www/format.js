// Number formatting and colour scales shared by the views.

/** A value for a table cell: 4 decimals, a minus sign that reads as one. */
export function cell(x) {
  if (!Number.isFinite(x)) return String(x);
  const s = Math.abs(x) >= 1e5 || (x !== 0 && Math.abs(x) < 1e-4) ? x.toExponential(3) : x.toFixed(4);
  return s.replace('-', '−');
}

/** The headline optimal value: 6 decimals, as `burnin solve` prints it. */
export function headline(x) {
  return x.toFixed(6).replace('-', '−');
}

/** Paper (t = 0) to teal (t = 1). */
export function valueColour(t) {
  const a = [247, 243, 234], b = [47, 111, 115];
  const c = a.map((v, i) => Math.round(v + (b[i] - v) * Math.min(1, Math.max(0, t))));
  return `rgb(${c[0]}, ${c[1]}, ${c[2]})`;
}

/** Text colour that stays readable on valueColour(t). */
export function inkOn(t) {
  return t > 0.55 ? '#fffdf8' : '#1e282d';
}

/** A summary number: fewer decimals as it grows. */
export function short(x) {
  if (!Number.isFinite(x)) return String(x);
  const a = Math.abs(x);
  const s = a >= 1e6 ? x.toExponential(3) : a >= 100 ? x.toFixed(1) : a >= 1 ? x.toFixed(3) : x.toPrecision(3);
  return s.replace('-', '−');
}

/**
 * A whole number with thousands separators ("12,345"). Not toLocaleString:
 * its first call loads locale data and blocks the page for tens of ms.
 */
export function grouped(n) {
  const s = String(Math.round(n));
  return s.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/** A date and time as "2026-12-01 22:16". */
export function stamp(iso) {
  const d = new Date(iso);
  const p = (x) => String(x).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())} ${p(d.getHours())}:${p(d.getMinutes())}`;
}
