'use client';
import { useEffect } from 'react';

/** Registers the service worker built by the PWA plugin (production builds only). */
export function ServiceWorkerRegistration() {
  useEffect(() => {
    if (process.env.NODE_ENV !== 'production' || !('serviceWorker' in navigator)) return;
    navigator.serviceWorker.register('/sw.js', { scope: '/' }).catch((err) => console.warn('Service worker not registered', err));
  }, []);
  return null;
}
