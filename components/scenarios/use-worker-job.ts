'use client';
import { useCallback, useEffect, useRef, useState } from 'react';
import { createForecastClient, isCancelledError, type ForecastClient } from '@/lib/worker/forecast-client';
import type { ProgressCallback } from '@/lib/model';

export type JobStatus = 'idle' | 'running' | 'done' | 'error' | 'cancelled';

export interface JobState<T> {
  status: JobStatus;
  /** Fraction done, 0..1 (while running). */
  progress: number;
  result: T | undefined;
  error: Error | undefined;
}

/**
 * One long computation in a worker of its own (ensemble, fit, forecast), with progress and a
 * cancel that terminates that worker only: the screen's live chart, in another worker, keeps going.
 */
export function useWorkerJob<T>() {
  const client = useRef<ForecastClient | null>(null);
  const token = useRef(0);
  const [state, setState] = useState<JobState<T>>({ status: 'idle', progress: 0, result: undefined, error: undefined });

  useEffect(() => () => client.current?.dispose(), []);

  const start = useCallback((fn: (c: ForecastClient, onProgress: ProgressCallback) => Promise<T>) => {
    client.current ??= createForecastClient();
    if (client.current.busy) client.current.cancel();
    const mine = ++token.current;
    setState((s) => ({ status: 'running', progress: 0, result: s.result, error: undefined }));
    const onProgress: ProgressCallback = (done, total) => {
      if (token.current === mine) setState((s) => (s.status === 'running' ? { ...s, progress: total > 0 ? done / total : 0 } : s));
    };
    fn(client.current, onProgress).then(
      (result) => {
        if (token.current === mine) setState({ status: 'done', progress: 1, result, error: undefined });
      },
      (e: unknown) => {
        if (token.current !== mine) return;
        if (isCancelledError(e)) return;
        setState((s) => ({ status: 'error', progress: 0, result: s.result, error: e instanceof Error ? e : new Error(String(e)) }));
      },
    );
  }, []);

  const cancel = useCallback(() => {
    token.current++;
    client.current?.cancel();
    setState((s) => ({ status: 'cancelled', progress: 0, result: s.result, error: undefined }));
  }, []);

  const clear = useCallback(() => {
    token.current++;
    setState({ status: 'idle', progress: 0, result: undefined, error: undefined });
  }, []);

  return { ...state, start, cancel, clear };
}
