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

/** The definition panel on screen (one at a time), and the "?" button that opened it. */
let defPanel = null;
let defOpener = null;

/** Puts the open panel beside its button, on screen (a phone's width included). */
function placeDef() {
  if (!defOpener || defPanel.hidden) return;
  const r = defOpener.getBoundingClientRect();
  const vw = document.documentElement.clientWidth, vh = window.innerHeight;
  defPanel.style.width = `${Math.min(352, vw - 16)}px`;
  const w = defPanel.offsetWidth, h = defPanel.offsetHeight;
  const left = Math.max(8, Math.min(r.left, vw - w - 8));
  // Below the button, or above it when only there is room.
  const below = r.bottom + 6, above = r.top - 6 - h;
  const top = below + h > vh - 8 && above >= 8 ? above : below;
  defPanel.style.left = `${left + window.scrollX}px`;
  defPanel.style.top = `${top + window.scrollY}px`;
}

/** Closes the open definition; `refocus` puts the keyboard back on its "?". */
export function closeDefinition(refocus = false) {
  if (!defPanel || defPanel.hidden) return;
  defPanel.hidden = true;
  const b = defOpener;
  defOpener = null;
  b?.setAttribute('aria-expanded', 'false');
  if (refocus) b?.focus();
}

function definitionPanel() {
  if (defPanel) return defPanel;
  defPanel = el('div', null, { id: 'definition', class: 'def-panel', role: 'dialog', tabindex: '-1' });
  defPanel.hidden = true;
  document.body.append(defPanel);
  // A tap or click anywhere else closes it (on another "?", that one opens).
  document.addEventListener('pointerdown', (e) => {
    if (!defPanel.hidden && !defPanel.contains(e.target) && e.target !== defOpener) closeDefinition();
  }, true);
  document.addEventListener('keydown', (e) => { if (e.key === 'Escape' && !defPanel.hidden) { e.preventDefault(); closeDefinition(true); } });
  // Tabbing out of it (past Close, or back before it) closes it and goes back to its "?".
  defPanel.addEventListener('keydown', (e) => {
    if (e.key !== 'Tab') return;
    const close = defPanel.querySelector('.def-close');
    if ((!e.shiftKey && e.target === close) || (e.shiftKey && e.target === defPanel)) { e.preventDefault(); closeDefinition(true); }
  });
  window.addEventListener('resize', placeDef);
  document.addEventListener('scroll', placeDef, { capture: true, passive: true });
  return defPanel;
}

/**
 * A small "?" button (its mark drawn by the style sheet, so the text of the
 * header it sits in stays the header's) that opens beside it the
 * definitions `terms` ([{name, meaning}], the core's glossary) of what
 * `what` names. A second click or tap, Escape, Close or a tap elsewhere
 * closes it; one is open at a time.
 */
export function definitionButton(what, terms) {
  const b = el('button', null, { type: 'button', class: 'def', 'aria-label': `What ${what} means`, 'aria-expanded': 'false', 'aria-controls': 'definition' });
  b.addEventListener('click', (e) => {
    e.stopPropagation();
    const panel = definitionPanel();
    if (defOpener === b && !panel.hidden) { closeDefinition(); return; }
    closeDefinition();
    const list = el('dl');
    for (const t of terms) list.append(el('dt', t.name), el('dd', t.meaning, { 'data-term': t.key }));
    const close = el('button', 'Close', { type: 'button', class: 'def-close' });
    close.addEventListener('click', () => closeDefinition(true));
    panel.replaceChildren(list, close);
    panel.setAttribute('aria-label', `What ${what} means`);
    panel.hidden = false;
    defOpener = b;
    b.setAttribute('aria-expanded', 'true');
    placeDef();
    panel.focus({ preventScroll: true });
  });
  return b;
}
