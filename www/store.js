// The library in local storage: one key per saved item, each a versioned
// envelope, plus one key for the autosaved current work. A corrupted item is
// skipped (and reported) without touching the others; a full quota leaves
// what was stored before unchanged, since a failed setItem changes nothing.

const PREFIX = 'burnin:v1:entry:';
const AUTOSAVE_PREFIX = 'burnin:v1:autosave:';
/** Autosaves kept (one per tab that worked here), newest first. */
const AUTOSAVES_KEPT = 8;

/**
 * This tab's identity, kept in sessionStorage (which survives a reload of
 * the tab but is not shared with other tabs): each tab autosaves under its
 * own key, so two open tabs never overwrite each other's work.
 */
const TAB = (() => {
  let id = sessionStorage.getItem('burnin:tab');
  if (!id) {
    const b = new Uint8Array(6);
    crypto.getRandomValues(b);
    id = Array.from(b, (x) => x.toString(16).padStart(2, '0')).join('');
    sessionStorage.setItem('burnin:tab', id);
  }
  return id;
})();
const AUTOSAVE = AUTOSAVE_PREFIX + TAB;

/** Whether a storage key belongs to the library (for `storage` events). */
export const isEntryKey = (key) => typeof key === 'string' && key.startsWith(PREFIX);
export const ENTRY_FORMAT = 'burnin-saved';
export const ENTRY_VERSION = 1;

/** Thrown when the browser refuses to store more. */
export class StorageFull extends Error {}

function write(key, value) {
  try {
    localStorage.setItem(key, JSON.stringify(value));
  } catch (err) {
    if (err && (err.name === 'QuotaExceededError' || err.code === 22)) {
      throw new StorageFull('The browser\u2019s storage for this page is full; nothing was changed. Delete saved items or save to a file instead.');
    }
    throw err;
  }
}

function newId() {
  const b = new Uint8Array(8);
  crypto.getRandomValues(b);
  return Array.from(b, (x) => x.toString(16).padStart(2, '0')).join('');
}

/** Checks one stored envelope; returns the entry or a reason it is unusable. */
function check(raw) {
  let e;
  try { e = JSON.parse(raw); } catch { return { reason: 'not valid JSON' }; }
  if (!e || typeof e !== 'object') return { reason: 'not an object' };
  if (e.format !== ENTRY_FORMAT) return { reason: `format ${JSON.stringify(e.format)} is not ${ENTRY_FORMAT}` };
  if (e.version !== ENTRY_VERSION) return { reason: `version ${JSON.stringify(e.version)} is not supported` };
  if (typeof e.name !== 'string' || typeof e.model !== 'string' || !['model', 'experiment'].includes(e.kind)) {
    return { reason: 'missing name, kind or model' };
  }
  return { entry: e };
}

/** Every saved item, newest first, and the keys that were skipped with why. */
export function listEntries() {
  const entries = [], skipped = [];
  for (let i = 0; i < localStorage.length; i++) {
    const key = localStorage.key(i);
    if (!key || !key.startsWith(PREFIX)) continue;
    const { entry, reason } = check(localStorage.getItem(key));
    if (entry) entries.push(entry); else skipped.push({ key, reason });
  }
  entries.sort((a, b) => (b.saved_at || '').localeCompare(a.saved_at || ''));
  return { entries, skipped };
}

export function getEntry(id) {
  const raw = localStorage.getItem(PREFIX + id);
  return raw === null ? null : check(raw).entry || null;
}

/** Saves a new item: {kind, name, model, experiment?, results?}. */
export function saveEntry(item) {
  const entry = { format: ENTRY_FORMAT, version: ENTRY_VERSION, id: newId(), saved_at: new Date().toISOString(), ...item };
  write(PREFIX + entry.id, entry);
  return entry;
}

export function renameEntry(id, name) {
  const e = getEntry(id);
  if (!e) return;
  write(PREFIX + id, { ...e, name, saved_at: new Date().toISOString() });
}

export function duplicateEntry(id) {
  const e = getEntry(id);
  if (!e) return null;
  const { id: _old, saved_at: _t, ...rest } = e;
  return saveEntry({ ...rest, name: `${e.name} (copy)` });
}

export function deleteEntry(id) {
  localStorage.removeItem(PREFIX + id);
}

/** Keeps this tab's current work; throws StorageFull when it cannot. */
export function autosave(state) {
  write(AUTOSAVE, { format: 'burnin-autosave', version: 1, saved_at: new Date().toISOString(), ...state });
  pruneAutosaves();
}

function readAutosave(key) {
  try {
    const s = JSON.parse(localStorage.getItem(key));
    return s && s.format === 'burnin-autosave' && s.version === 1 && typeof s.model === 'string' ? s : null;
  } catch {
    return null;
  }
}

function autosaveKeys() {
  const keys = [];
  for (let i = 0; i < localStorage.length; i++) {
    const k = localStorage.key(i);
    if (k && k.startsWith(AUTOSAVE_PREFIX)) keys.push(k);
  }
  return keys
    .map((k) => ({ k, t: readAutosave(k)?.saved_at || '' }))
    .sort((a, b) => b.t.localeCompare(a.t));
}

function pruneAutosaves() {
  for (const { k } of autosaveKeys().slice(AUTOSAVES_KEPT)) localStorage.removeItem(k);
}

/** This tab's autosave after a reload; in a new tab, the newest one of any tab. */
export function loadAutosave() {
  return readAutosave(AUTOSAVE) || (autosaveKeys()[0] && readAutosave(autosaveKeys()[0].k));
}

// Kept learners: a user's own learner module, kept only when the user asks
// ("Keep in this browser"), never loaded by itself: the page shows its code
// before it runs again. One key per learner name.
const GUEST_PREFIX = 'burnin:v1:learner:';
const GUEST_FORMAT = 'burnin-kept-learner';
/** Largest learner module kept, in characters. */
export const MAX_GUEST_SOURCE = 1 << 20;

/** Keeps a learner module's text under its name (replacing an older copy). */
export function keepGuest(name, file, source) {
  if (source.length > MAX_GUEST_SOURCE) throw new Error(`${file} is larger than ${MAX_GUEST_SOURCE >> 10} KiB; it was not kept`);
  write(GUEST_PREFIX + name, { format: GUEST_FORMAT, version: 1, name, file, source, saved: new Date().toISOString() });
}

/** The kept learners, [{name, file, source, saved}], by name; unreadable ones are skipped. */
export function keptGuests() {
  const out = [];
  for (let i = 0; i < localStorage.length; i++) {
    const key = localStorage.key(i);
    if (!key?.startsWith(GUEST_PREFIX)) continue;
    try {
      const e = JSON.parse(localStorage.getItem(key));
      if (e?.format === GUEST_FORMAT && e.version === 1 && typeof e.source === 'string' && typeof e.name === 'string') out.push(e);
    } catch { /* a damaged copy is not offered */ }
  }
  return out.sort((a, b) => a.name.localeCompare(b.name));
}

export function forgetGuest(name) { localStorage.removeItem(GUEST_PREFIX + name); }
