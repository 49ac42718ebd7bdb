'use client';
import { liveQuery } from 'dexie';
import { useEffect, useState } from 'react';

/**
 * A Dexie live query as React state: re-runs when the tables it read change (in this tab or
 * another). `undefined` until the first answer. `deps` re-creates the query (like useEffect).
 */
export function useLive<T>(query: () => Promise<T>, deps: unknown[]): T | undefined {
  const [value, setValue] = useState<T>();
  useEffect(() => {
    const sub = liveQuery(query).subscribe({ next: (v) => setValue(() => v), error: (e) => console.warn('Local query failed', e) });
    return () => sub.unsubscribe();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, deps);
  return value;
}
