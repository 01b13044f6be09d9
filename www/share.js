// Share links: the model (and the experiment set-up) compressed into the URL
// fragment, which never leaves the browser. Decoding is bounded.

/** Longest fragment we make or read, in characters. */
export const MAX_LINK_CHARS = 60000;
/** Largest decompressed payload we accept, in bytes. */
const MAX_PAYLOAD_BYTES = 4 << 20;
const KEY = 'share=';

function toBase64Url(bytes) {
  let s = '';
  for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(s).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
}

function fromBase64Url(text) {
  const s = atob(text.replace(/-/g, '+').replace(/_/g, '/'));
  const out = new Uint8Array(s.length);
  for (let i = 0; i < s.length; i++) out[i] = s.charCodeAt(i);
  return out;
}

async function pump(stream, limit) {
  const reader = stream.getReader();
  const chunks = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.length;
    if (size > limit) { await reader.cancel(); throw new Error(`the link holds more than ${limit} bytes`); }
    chunks.push(value);
  }
  const out = new Uint8Array(size);
  let at = 0;
  for (const c of chunks) { out.set(c, at); at += c.length; }
  return out;
}

/** The fragment for `payload` (any JSON value), or an Error saying why not. */
export async function encode(payload) {
  const bytes = new TextEncoder().encode(JSON.stringify(payload));
  const packed = await pump(new Blob([bytes]).stream().pipeThrough(new CompressionStream('deflate-raw')), Infinity);
  const frag = KEY + toBase64Url(packed);
  if (frag.length > MAX_LINK_CHARS) {
    throw new Error(`This model is too large for a link (${Math.round(frag.length / 1024)} KB compressed, the limit is ${Math.round(MAX_LINK_CHARS / 1024)} KB); save it as a file instead.`);
  }
  return frag;
}

/** Whether a fragment (without '#') is a share link. */
export const isShare = (hash) => hash.startsWith(KEY);

/** Decodes a share fragment into its payload, or throws with a reason. */
export async function decode(hash) {
  if (hash.length > MAX_LINK_CHARS + KEY.length) throw new Error('the link is longer than any link Burnin makes');
  let packed;
  try { packed = fromBase64Url(hash.slice(KEY.length)); } catch { throw new Error('the link is damaged (not base64url)'); }
  let bytes;
  try {
    bytes = await pump(new Blob([packed]).stream().pipeThrough(new DecompressionStream('deflate-raw')), MAX_PAYLOAD_BYTES);
  } catch (err) {
    throw new Error(`the link is damaged (${err.message || 'it does not decompress'})`);
  }
  try { return JSON.parse(new TextDecoder().decode(bytes)); } catch { throw new Error('the link is damaged (not JSON)'); }
}
