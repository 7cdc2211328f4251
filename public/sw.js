// Service worker: caches every built file so the app opens with the network off.
// scripts/postbuild.mjs replaces the two placeholders at each build, so every build gets its own
// cache and the old ones are dropped when the new worker activates.
const BUILD = '__TAPLINE_BUILD__';
const FILES = __TAPLINE_FILES__;
const CACHE = 'tapline-' + BUILD;

self.addEventListener('install', (event) => {
  event.waitUntil(
    caches.open(CACHE).then((cache) => cache.addAll(FILES)).then(() => self.skipWaiting())
  );
});

self.addEventListener('activate', (event) => {
  event.waitUntil(
    caches.keys()
      .then((keys) => Promise.all(keys.filter((k) => k.startsWith('tapline-') && k !== CACHE).map((k) => caches.delete(k))))
      .then(() => self.clients.claim())
  );
});

self.addEventListener('fetch', (event) => {
  const request = event.request;
  if (request.method !== 'GET' || new URL(request.url).origin !== self.location.origin) {
    return;
  }
  event.respondWith(
    caches.open(CACHE).then((cache) =>
      cache.match(request, { ignoreSearch: true }).then((hit) => {
        if (hit) {
          return hit;
        }
        return fetch(request).catch(() =>
          request.mode === 'navigate' ? cache.match('./index.html') : Response.error()
        );
      })
    )
  );
});
