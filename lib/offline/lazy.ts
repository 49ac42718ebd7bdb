'use client';
/**
 * The local database and the sync client, loaded on demand: Dexie (about 30 kB compressed) stays
 * out of every page's first-load JavaScript and arrives right after, in parallel with hydration.
 */
import type { EbbcastDb } from './db';

export const loadDb = (): Promise<EbbcastDb> => import('./db').then((m) => m.localDb());
export const loadSync = () => import('./sync-client');
