'use client';
import { useEffect, useRef, useState } from 'react';
import { ModelError, type Run, type ScenarioInput, type Summary } from '@/lib/model';
import { createForecastClient, isCancelledError, type ForecastClient } from '@/lib/worker/forecast-client';

/** Forward Euler against RK4 at the same step, on whole days. */
export interface StepCheck {
  step: number;
  t: Float64Array;
  rk4: Float64Array;
  euler: Float64Array | null;
  /** Why Euler could not run at this step (its unsafe-step message), if so. */
  eulerError: ModelError | null;
  /** Largest |I_euler − I_rk4| over the days, people, and the day it happens. */
  maxDiff: number | null;
  maxDiffDay: number | null;
  /** The same relative to the RK4 peak, fraction. */
  maxDiffShare: number | null;
}

export interface LiveRun {
  run: Run | null;
  summary: Summary | null;
  error: Error | null;
  check: StepCheck | null;
  computing: boolean;
}

const DEBOUNCE_MS = 180;

/**
 * The scenario recomputed in a worker (never on the main thread), debounced, whenever it changes:
 * the run and its figures, plus the Euler-vs-RK4 step check. A newer input cancels an older
 * computation still in flight, so a slow run (fine step, long horizon) never queues up edits.
 */
export function useLiveRun(input: ScenarioInput | null): LiveRun {
  const client = useRef<ForecastClient | null>(null);
  const token = useRef(0);
  const [state, setState] = useState<LiveRun>({ run: null, summary: null, error: null, check: null, computing: false });

  useEffect(() => () => client.current?.dispose(), []);

  const key = input ? JSON.stringify(input) : '';
  useEffect(() => {
    if (!input) return;
    const mine = ++token.current;
    const timer = setTimeout(() => {
      client.current ??= createForecastClient();
      const c = client.current;
      if (c.busy) c.cancel();
      setState((s) => ({ ...s, computing: true }));
      const daily: ScenarioInput = { ...input, record: 'daily' };
      const main = c.forecast(daily);
      const fixedStep = input.step;
      const rk4 = input.method === 'rk4' ? main.then((r) => r.run) : c.simulate({ ...daily, method: 'rk4' });
      const euler = input.method === 'euler' ? main.then((r) => r.run) : c.simulate({ ...daily, method: 'euler' });
      Promise.allSettled([main, rk4, euler]).then(([m, r, e]) => {
        if (token.current !== mine) return;
        if ([m, r, e].some((x) => x.status === 'rejected' && isCancelledError(x.reason))) return;
        const next: LiveRun = { run: null, summary: null, error: null, check: null, computing: false };
        if (m.status === 'fulfilled') {
          next.run = m.value.run;
          next.summary = m.value.summary;
        } else {
          next.error = m.reason instanceof Error ? m.reason : new Error(String(m.reason));
        }
        if (r.status === 'fulfilled') {
          const rk = r.value;
          const eu = e.status === 'fulfilled' ? e.value : null;
          let maxDiff: number | null = null;
          let maxDiffDay: number | null = null;
          let peak = 0;
          for (let k = 0; k < rk.I.length; k++) peak = Math.max(peak, rk.I[k]!);
          if (eu) {
            maxDiff = 0;
            for (let k = 0; k < rk.I.length; k++) {
              const d = Math.abs(eu.I[k]! - rk.I[k]!);
              if (d > maxDiff) {
                maxDiff = d;
                maxDiffDay = rk.t[k]!;
              }
            }
          }
          next.check = {
            step: fixedStep,
            t: rk.t,
            rk4: rk.I,
            euler: eu ? eu.I : null,
            eulerError: e.status === 'rejected' && e.reason instanceof ModelError ? e.reason : null,
            maxDiff,
            maxDiffDay,
            maxDiffShare: maxDiff !== null && peak > 0 ? maxDiff / peak : null,
          };
        }
        setState(next);
      });
    }, DEBOUNCE_MS);
    return () => clearTimeout(timer);
    // The serialised input is the dependency: a new object with the same content does not recompute.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key]);

  return state;
}
