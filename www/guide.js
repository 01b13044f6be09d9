// The "How to read these results" panel: each term's "?" opens the core's
// definition; the page's caution about toy models closes it. Opened from
// its link beside the results heading, and offered once per browser
// session, after the first run that finishes (`offerGuide`).
import { definitionButton, closeDefinition } from './dom.js';

const $ = (id) => document.getElementById(id);

/** The session storage key that says the guide was offered in this browser session. */
const GUIDE_OFFERED = 'burnin:v1:guide-offered';

/** Fills the guide's "?" slots from `terms(key)` (the core's glossary entries) and wires its link and Close. */
export function initGuide(terms) {
  for (const slot of document.querySelectorAll('#guide [data-def]')) {
    const [t] = terms(slot.dataset.def);
    if (t) slot.replaceWith(definitionButton(t.name, [t]));
  }
  $('guide-caveat').textContent = $('results-caution').textContent;
  $('guide-open').addEventListener('click', () => ($('guide').hidden ? showGuide() : hideGuide()));
  $('guide-close').addEventListener('click', () => hideGuide(true));
  $('guide').addEventListener('keydown', (e) => { if (e.key === 'Escape' && $('definition')?.hidden !== false) hideGuide(true); });
}

function showGuide() {
  $('guide').hidden = false;
  $('guide-open').setAttribute('aria-expanded', 'true');
  $('guide').scrollIntoView({ block: 'start', behavior: 'instant' });
  $('guide').focus({ preventScroll: true });
}

function hideGuide(refocus = false) {
  closeDefinition();
  $('guide').hidden = true;
  $('guide-open').setAttribute('aria-expanded', 'false');
  if (refocus) $('guide-open').focus();
}

/** Shows the guide after a run, the first time in this browser session only. */
export function offerGuide() {
  try {
    if (sessionStorage.getItem(GUIDE_OFFERED)) return;
    sessionStorage.setItem(GUIDE_OFFERED, 'yes');
  } catch {
    return; // no session storage: the link offers it, never unasked
  }
  showGuide();
}
