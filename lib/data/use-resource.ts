'use client';
import { useCallback, useEffect, useState } from 'react';
import { apiFetch } from './api';

export interface Resource<T> {
  data: T | undefined;
  error: Error | null;
  loading: boolean;
  reload: () => void;
}

/** Loads a JSON resource from the API; `url` null means "not yet" (e.g. no outbreak chosen). */
export function useResource<T>(url: string | null): Resource<T> {
  const [data, setData] = useState<T>();
  const [error, setError] = useState<Error | null>(null);
  const [loading, setLoading] = useState(Boolean(url));
  const [tick, setTick] = useState(0);
  useEffect(() => {
    if (!url) return;
    let live = true;
    setLoading(true);
    apiFetch<T>(url)
      .then((d) => live && (setData(d), setError(null)))
      .catch((e: Error) => live && setError(e))
      .finally(() => live && setLoading(false));
    return () => {
      live = false;
    };
  }, [url, tick]);
  const reload = useCallback(() => setTick((n) => n + 1), []);
  return { data, error, loading, reload };
}
