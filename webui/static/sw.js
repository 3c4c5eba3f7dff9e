// Service worker: keeps the app's own files so it loads with no connection.
// Files are served from the cache at once and refreshed from the network for
// the next load. API answers are never cached here; the app keeps job data
// in IndexedDB. Browsers run a service worker only in a secure context
// (https, or localhost).

const VERSION = 'fieldtab-app-v1'; // bump when the list or the caching changes

const SHELL = [
  './', // index.html (the server redirects /index.html to /)
  'app.css',
  'screens.css',
  'manifest.webmanifest',
  'icon.svg',
  'js/main.js',
  'js/ui.js',
  'js/api.js',
  'js/store.js',
  'js/outbox.js',
  'js/sync.js',
  'js/quantities.js',
  'js/chart.js',
  'js/screens/join.js',
  'js/screens/jobs.js',
  'js/screens/home.js',
  'js/screens/outlets.js',
  'js/screens/outlet.js',
  'js/screens/outbox.js',
  'js/screens/lead.js',
  'js/screens/traverse.js',
  'js/screens/capacity.js',
  'js/screens/water.js',
  'js/screens/fan.js',
  'js/screens/entry.js',
];

self.addEventListener('install', (event) => {
  event.waitUntil((async () => {
    const cache = await caches.open(VERSION);
    // One by one, so a file missing on the server does not stop the rest.
    await Promise.all(SHELL.map(async (path) => {
      try {
        const res = await fetch(new Request(path, { cache: 'no-cache' }));
        if (res.ok) await cache.put(path, res);
      } catch { /* offline during install: the next visit fills it */ }
    }));
    await self.skipWaiting();
  })());
});

self.addEventListener('activate', (event) => {
  event.waitUntil((async () => {
    for (const key of await caches.keys()) if (key !== VERSION) await caches.delete(key);
    await self.clients.claim();
  })());
});

self.addEventListener('fetch', (event) => {
  const req = event.request;
  if (req.method !== 'GET') return;
  const url = new URL(req.url);
  if (url.origin !== self.location.origin || url.pathname.startsWith('/api/')) return;
  event.respondWith(cacheFirst(event, req, url));
});

async function cacheFirst(event, req, url) {
  const cache = await caches.open(VERSION);
  // Any page address is the app (the router works on the #hash).
  const key = req.mode === 'navigate' ? './' : url.pathname + url.search;
  const hit = await cache.match(key, { ignoreSearch: req.mode === 'navigate' });
  const fresh = fetch(req, { cache: 'no-cache' }).then(async (res) => {
    if (res.ok && res.type === 'basic') await cache.put(key, res.clone());
    return res;
  });
  if (hit) {
    event.waitUntil(fresh.catch(() => {})); // refresh for next time
    return hit;
  }
  try {
    return await fresh;
  } catch {
    return new Response('fieldtab is offline and this file was not kept.', { status: 503, headers: { 'Content-Type': 'text/plain' } });
  }
}
