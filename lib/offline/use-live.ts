'use client';
import { useEffect, useState } from 'react';
import type { EbbcastDb } from './db';

/**
 * A Dexie live query as React state: re-runs when the tables it read change (in this tab or
 * another). `undefined` until the first answer. `deps` re-creates the query (like useEffect).
 * Dexie itself is loaded on first use (lib/offline/lazy.ts); the query gets the open database.
 */
export function useLive<T>(query: (db: EbbcastDb) => Promise<T>, deps: unknown[]): T | undefined {
  const [value, setValue] = useState<T>();
  useEffect(() => {
    let live = true;
    let unsubscribe: (() => void) | null = null;
    void Promise.all([import('dexie'), import('./db')]).then(([{ liveQuery }, m]) => {
      if (!live) return;
      const db = m.localDb();
      const sub = liveQuery(() => query(db)).subscribe({ next: (v) => setValue(() => v), error: (e) => console.warn('Local query failed', e) });
      unsubscribe = () => sub.unsubscribe();
    });
    return () => {
      live = false;
      unsubscribe?.();
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, deps);
  return value;
}
