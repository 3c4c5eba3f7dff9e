// Service worker: the app's own files from the cache, so it loads offline; a
// page load refreshes the list in the background, at most once a minute. API
// answers are never cached (job data is in IndexedDB). Secure contexts only.

const VERSION = 'fieldtab-app-v18'; // bump when the list or the caching changes
const REFRESH_MS = 60000;
let refreshedAt = 0; // in memory: a restarted worker refreshes on the next load

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
  'js/labels.js',
  'js/form.js',
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
  'js/screens/fix.js',
  'js/screens/signoff.js',
  'js/screens/setup.js',
  'js/screens/edit.js',
];

// refresh: each file on its own, so one missing does not stop the rest.
async function refresh() {
  refreshedAt = Date.now();
  const cache = await caches.open(VERSION);
  await Promise.all(SHELL.map(async (path) => {
    try {
      const res = await fetch(new Request(path, { cache: 'no-cache' }));
      if (res.ok) await cache.put(path, res);
    } catch { /* offline: the kept copy stays */ }
  }));
}

self.addEventListener('install', (event) => {
  event.waitUntil(refresh().then(() => self.skipWaiting()));
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
  const nav = req.mode === 'navigate';
  const key = nav ? './' : url.pathname + url.search;
  if (nav && Date.now() - refreshedAt > REFRESH_MS) event.waitUntil(refresh());
  const hit = await cache.match(key, { ignoreSearch: nav });
  if (hit) return hit;
  try {
    const res = await fetch(req, { cache: 'no-cache' });
    if (res.ok && res.type === 'basic') await cache.put(key, res.clone());
    return res;
  } catch {
    return new Response('fieldtab is offline and this file was not kept.', { status: 503, headers: { 'Content-Type': 'text/plain' } });
  }
}
