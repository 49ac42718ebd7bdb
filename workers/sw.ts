/// <reference lib="webworker" />
/**
 * The service worker (built by @serwist/next into public/sw.js). It precaches the build's assets,
 * the static field shells and the offline page (next.config.js), answers `/site?id=…`-style
 * addresses from the one precached shell (query ignored), caches other requests at run time (never
 * the API or the desk screens), and shows /offline for any other document when the network is gone
 * (SYNC.md, "Offline screens").
 */
import { defaultCache } from '@serwist/next/worker';
import type { PrecacheEntry, SerwistGlobalConfig } from 'serwist';
import { NetworkOnly, Serwist, type RuntimeCaching } from 'serwist';

declare global {
  interface WorkerGlobalScope extends SerwistGlobalConfig {
    __SW_MANIFEST: (PrecacheEntry | string)[] | undefined;
  }
}

declare const self: ServiceWorkerGlobalScope;

/** Desk screens are online-only server pages: never served stale from a cache (they say "offline" instead). */
const DESK = /^\/(admin|manage|merge|ledger|sitrep|mail)(\/|$)/;

/**
 * Rules in front of the defaults. The API is never cached: screens read IndexedDB, and a cached
 * pull or /api/me answered offline would make a sync look successful or a session look alive.
 */
const runtimeCaching: RuntimeCaching[] = [
  { matcher: ({ sameOrigin, url }) => sameOrigin && url.pathname.startsWith('/api/'), handler: new NetworkOnly() },
  { matcher: ({ sameOrigin, url }) => sameOrigin && DESK.test(url.pathname), handler: new NetworkOnly() },
  ...defaultCache,
];

const serwist = new Serwist({
  precacheEntries: self.__SW_MANIFEST,
  precacheOptions: { ignoreURLParametersMatching: [/.*/] },
  // A new version waits until the user accepts the update prompt (components/shell/update-prompt).
  skipWaiting: false,
  clientsClaim: true,
  navigationPreload: false,
  runtimeCaching,
  fallbacks: {
    entries: [{ url: '/offline', matcher: ({ request }) => request.destination === 'document' }],
  },
});

self.addEventListener('message', (event) => {
  if ((event.data as { type?: string } | null)?.type === 'SKIP_WAITING') void self.skipWaiting();
});

serwist.addEventListeners();
