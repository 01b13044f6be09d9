// Burnin's service worker, written by `cargo xtask dist` for one published
// build: it keeps exactly the files of that build in a cache named by
// their digest, answers from it (so the page opens, solves and runs with
// the network gone), and never takes over from an older build on its own:
// the page offers "a newer version is available — reload", and only the
// user's click (never during a run) sends it "take-over".
const VERSION = '@VERSION@';
const FILES = @FILES@;
const CACHE = `burnin-${VERSION}`;

self.addEventListener('install', (event) => {
  event.waitUntil(caches.open(CACHE).then((c) => c.addAll(FILES)));
});

self.addEventListener('activate', (event) => {
  event.waitUntil((async () => {
    for (const k of await caches.keys()) if (k.startsWith('burnin-') && k !== CACHE) await caches.delete(k);
    await self.clients.claim();
  })());
});

self.addEventListener('fetch', (event) => {
  const req = event.request;
  if (req.method !== 'GET' || new URL(req.url).origin !== self.location.origin) return;
  event.respondWith((async () => {
    const cache = await caches.open(CACHE);
    return (await cache.match(req, { ignoreSearch: true })) || fetch(req);
  })());
});

self.addEventListener('message', (event) => {
  if (event.data === 'take-over') self.skipWaiting();
});
