/**
 * The app's service worker (built by vite-plugin-pwa in injectManifest
 * mode): precaches the whole built app so that it starts and works with no
 * network, and serves every navigation from the precached index.html.
 *
 * - The precache list (URLs with content revisions) comes from the build:
 *   the plugin writes it in place of `self.__WB_MANIFEST`.
 * - Caches are versioned: every cache this worker uses is named
 *   `shearfield-<purpose>-<CACHE_VERSION>`; on activation, caches of other
 *   versions (and workbox's outdated precache formats) are deleted.
 * - Updates never take over by themselves: a new worker waits until the page
 *   asks it to (message `{ type: 'SKIP_WAITING' }`, sent by
 *   pwa/sw-register.ts when the user agrees), so unsaved input is never lost.
 */
/// <reference lib="webworker" />
import { clientsClaim, setCacheNameDetails } from 'workbox-core';
import { cleanupOutdatedCaches, createHandlerBoundToURL, precacheAndRoute } from 'workbox-precaching';
import { NavigationRoute, registerRoute } from 'workbox-routing';

declare const self: ServiceWorkerGlobalScope & { __WB_MANIFEST: Array<string | { url: string; revision: string | null }> };

/** Bump when the caching scheme changes (not for content changes: those are revisioned per file). */
const CACHE_VERSION = 'v1';
const PREFIX = 'shearfield';

setCacheNameDetails({ prefix: PREFIX, suffix: CACHE_VERSION, precache: 'precache', runtime: 'runtime' });

precacheAndRoute(self.__WB_MANIFEST);
cleanupOutdatedCaches();

// Every page navigation gets the app shell; the office server's API is never answered from the cache.
registerRoute(new NavigationRoute(createHandlerBoundToURL('index.html'), { denylist: [/^\/api\//] }));

self.addEventListener('message', (event) => {
  if ((event.data as { type?: unknown } | null)?.type === 'SKIP_WAITING') void self.skipWaiting();
});

// The first install controls the open page at once (nothing older to replace);
// later versions get here only after the user agreed to the update.
clientsClaim();

self.addEventListener('activate', (event) => {
  event.waitUntil(
    caches.keys().then((names) =>
      Promise.all(
        names
          .filter((n) => n.startsWith(`${PREFIX}-`) && !n.endsWith(`-${CACHE_VERSION}`))
          .map((n) => caches.delete(n)),
      ),
    ),
  );
});
