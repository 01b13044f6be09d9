// DOM helpers shared by the views. Text always goes in as textContent.

/** An element with text (as textContent, never HTML) and attributes. */
export function el(tag, text, attrs = {}) {
  const e = document.createElement(tag);
  if (text !== undefined && text !== null) e.textContent = text;
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, v);
  return e;
}

/** A file name made from a label: letters, digits, dot, dash, underscore. */
export const safeName = (s, fallback = 'burnin') =>
  (s || fallback).replace(/[^\p{L}\p{N}._-]+/gu, '-').replace(/^-+|-+$/g, '').slice(0, 60) || fallback;

/** Offers `data` (text or a Blob) as a download named `name`. */
export function download(name, data, type = 'application/json') {
  const url = URL.createObjectURL(data instanceof Blob ? data : new Blob([data], { type }));
  const a = el('a', null, { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
