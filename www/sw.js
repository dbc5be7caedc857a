// The page's service worker: it keeps a copy of the page's own files so that the page works
// offline once it has been loaded. Requests go to the network first, so a new build is picked up
// at once; only when the network fails does the kept copy answer. It never fetches anything but
// the page's own files.

const CACHE = 'mixwell-page-v2';
// Everything the page and its workers load, so that a run can start offline.
const FILES = [
  './', 'index.html', 'style.css', 'icon.svg',
  'pkg/app.js', 'pkg/app.css', 'pkg/worker.js', 'pkg/chain-worker.js', 'pkg/diagnose-worker.js',
  'pkg/mixwell.js', 'pkg/mixwell_bg.wasm', 'pkg/examples.json',
];

self.addEventListener('install', (event) => {
  event.waitUntil(caches.open(CACHE).then((cache) => cache.addAll(FILES)).then(() => self.skipWaiting()));
});

self.addEventListener('activate', (event) => {
  event.waitUntil((async () => {
    for (const name of await caches.keys()) {
      if (name !== CACHE) await caches.delete(name);
    }
    await self.clients.claim();
  })());
});

self.addEventListener('fetch', (event) => {
  const { request } = event;
  const url = new URL(request.url);
  if (request.method !== 'GET' || !url.protocol.startsWith('http') || url.origin !== self.location.origin) return;
  event.respondWith((async () => {
    const cache = await caches.open(CACHE);
    let response;
    try {
      response = await fetch(request);
    } catch (error) {
      const kept = await cache.match(request, { ignoreSearch: true });
      if (kept) return kept;
      throw error;
    }
    // Keep whole answers only; keeping a copy may fail (storage full) without harm.
    if (response.status === 200) await cache.put(request, response.clone()).catch(() => {});
    return response;
  })());
});
