'use client';
import { useEffect, useState } from 'react';

/**
 * "A new version is ready": shown when a new service worker has installed and waits. The new
 * version takes over only when the officer says so (never in the middle of an entry); the page
 * then reloads once, under the new worker. Local data and the outbox live in IndexedDB and are
 * untouched by an update.
 */
export function UpdatePrompt() {
  const [waiting, setWaiting] = useState<ServiceWorker | null>(null);
  useEffect(() => {
    if (process.env.NODE_ENV !== 'production' || !('serviceWorker' in navigator)) return;
    let live = true;
    const watch = (reg: ServiceWorkerRegistration) => {
      // A worker waiting while another controls the page is an update (the first install is not).
      if (reg.waiting && navigator.serviceWorker.controller) setWaiting(reg.waiting);
      reg.addEventListener('updatefound', () => {
        const w = reg.installing;
        w?.addEventListener('statechange', () => {
          if (live && w.state === 'installed' && navigator.serviceWorker.controller) setWaiting(w);
        });
      });
    };
    navigator.serviceWorker.getRegistration('/').then((reg) => reg && watch(reg)).catch(() => undefined);
    navigator.serviceWorker.ready.then(watch).catch(() => undefined);
    return () => {
      live = false;
    };
  }, []);
  if (!waiting) return null;
  const update = () => {
    navigator.serviceWorker.addEventListener('controllerchange', () => window.location.reload(), { once: true });
    waiting.postMessage({ type: 'SKIP_WAITING' });
  };
  return (
    <div role="status" data-testid="update-prompt" className="no-print fixed inset-x-0 bottom-0 z-30 flex flex-wrap items-center justify-center gap-3 border-t-4 border-accent bg-panel px-4 py-3 text-ink shadow-lg">
      <span className="font-bold">A new version of Ebbcast is ready.</span>
      <span className="text-sm text-ink/70">Your local data and unsynced changes are kept.</span>
      <button type="button" onClick={update} className="min-h-touch rounded-lg bg-accent px-4 font-bold text-white">Update now</button>
      <button type="button" onClick={() => setWaiting(null)} className="min-h-touch rounded-lg border-2 border-ink/30 px-4 font-bold">Later</button>
    </div>
  );
}
