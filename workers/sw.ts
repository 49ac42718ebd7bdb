/// <reference lib="webworker" />
/**
 * The service worker (built by @serwist/next into public/sw.js). It precaches the build's assets,
 * the static field shells and the offline page (next.config.js), answers `/site?id=…`-style
 * addresses from the one precached shell (query ignored), caches other requests at run time, and
 * shows /offline for any other document when the network is gone (SYNC.md, "Offline screens").
 */
import { defaultCache } from '@serwist/next/worker';
import type { PrecacheEntry, SerwistGlobalConfig } from 'serwist';
import { Serwist } from 'serwist';

declare global {
  interface WorkerGlobalScope extends SerwistGlobalConfig {
    __SW_MANIFEST: (PrecacheEntry | string)[] | undefined;
  }
}

declare const self: ServiceWorkerGlobalScope;

const serwist = new Serwist({
  precacheEntries: self.__SW_MANIFEST,
  precacheOptions: { ignoreURLParametersMatching: [/.*/] },
  // A new version waits until the user accepts the update prompt (components/shell/update-prompt).
  skipWaiting: false,
  clientsClaim: true,
  navigationPreload: false,
  runtimeCaching: defaultCache,
  fallbacks: {
    entries: [{ url: '/offline', matcher: ({ request }) => request.destination === 'document' }],
  },
});

self.addEventListener('message', (event) => {
  if ((event.data as { type?: string } | null)?.type === 'SKIP_WAITING') void self.skipWaiting();
});

serwist.addEventListeners();
