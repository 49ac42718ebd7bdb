/**
 * The bridge from the screens to the forecast worker. No React; safe to import from client components
 * and during server rendering (nothing starts until the first call).
 *
 *   import { forecastClient, CancelledError } from '@/lib/worker/forecast-client';
 *
 *   const { run, summary } = await forecastClient.forecast(input);     // Run + Summary, one round trip
 *   const run = await forecastClient.simulate(input);                  // Run only
 *   const bands = await forecastClient.ensemble(input, { 'params.beta': [0.4, 0.6] }, 1000, seed,
 *     (done, total) => setProgress(done / total));                     // progress about every 2 %
 *   const bands2 = await forecastClient.ensembleFromSamples(input, samples, onProgress);
 *   const fit = await forecastClient.fitScenario(fitInput);            // and fitCurve, forecastFromFit
 *   forecastClient.cancel();   // stop whatever runs: terminates the worker; every pending call rejects
 *                              // with CancelledError; the next call starts a fresh worker
 *
 * Errors: a bad scenario rejects with ModelError (code, field such as 'params.beta' or 'step',
 * largestSafeStep for an unsafe step), the same class the engine throws, so a form can mark the field.
 * `createForecastClient(makeWorker)` builds a separate client (e.g. one per screen, or for tests).
 */
import { proxy, wrap, type Endpoint, type Remote } from 'comlink';
import { ModelError } from '../model/errors';
import type {
  EnsembleResult, FitCurve, FitInput, FitResult, ForecastBase, ForecastResult, ParamRanges, ParamSample,
  ProgressCallback, Run, ScenarioInput, Summary,
} from '../model';
import type { ForecastWorkerApi } from '../../workers/forecast.worker';

/** Rejection of every call pending when `cancel()` (or `dispose()`) ran. */
export class CancelledError extends Error {
  constructor(message = 'The forecast was cancelled') {
    super(message);
    this.name = 'CancelledError';
  }
}

export const isCancelledError = (e: unknown): e is CancelledError =>
  e instanceof CancelledError || (e instanceof Error && e.name === 'CancelledError');

/** What the client needs of a Worker: a comlink endpoint that can be terminated (a MessagePort fits, for tests). */
export type WorkerLike = Endpoint & { terminate(): void };

export interface ForecastClient {
  simulate(input: ScenarioInput): Promise<Run>;
  /** Re-integrates in the worker to find the step-level peak; prefer `forecast`. */
  summarize(run: Run, input: ScenarioInput): Promise<Summary>;
  forecast(input: ScenarioInput): Promise<{ run: Run; summary: Summary }>;
  ensemble(
    input: ScenarioInput,
    ranges: ParamRanges,
    runs: number,
    seed: number,
    onProgress?: ProgressCallback,
  ): Promise<EnsembleResult>;
  ensembleFromSamples(input: ScenarioInput, samples: readonly ParamSample[], onProgress?: ProgressCallback): Promise<EnsembleResult>;
  fitScenario(input: FitInput): Promise<FitResult>;
  fitCurve(fit: FitResult): Promise<FitCurve>;
  forecastFromFit(fit: FitResult, base: ForecastBase, runs: number, seed: number, onProgress?: ProgressCallback): Promise<ForecastResult>;
  /** Terminates the worker now; pending calls reject with CancelledError. The next call restarts it. */
  cancel(): void;
  /** Same as cancel, for unmounting. */
  dispose(): void;
  /** True while a call is pending. */
  readonly busy: boolean;
}

const defaultWorker = (): WorkerLike =>
  new Worker(new URL('../../workers/forecast.worker.ts', import.meta.url), { type: 'module', name: 'forecast' });

/** A ModelError thrown in the worker arrives as plain data; rebuild the class. */
function revive(e: unknown): unknown {
  if (ModelError.isData(e)) return ModelError.fromJSON(e);
  return e;
}

export function createForecastClient(makeWorker: () => WorkerLike = defaultWorker): ForecastClient {
  let current: { worker: WorkerLike; remote: Remote<ForecastWorkerApi> } | null = null;
  const pending = new Set<(e: unknown) => void>();

  const ensure = () => {
    if (!current) {
      const worker = makeWorker();
      current = { worker, remote: wrap<ForecastWorkerApi>(worker) };
    }
    return current.remote;
  };

  function call<T>(fn: (api: Remote<ForecastWorkerApi>) => Promise<T>): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      pending.add(reject);
      let p: Promise<T>;
      try {
        p = fn(ensure());
      } catch (e) {
        pending.delete(reject);
        reject(revive(e));
        return;
      }
      p.then(
        (v) => {
          pending.delete(reject);
          resolve(v);
        },
        (e: unknown) => {
          pending.delete(reject);
          reject(revive(e));
        },
      );
    });
  }

  const progress = (cb: ProgressCallback | undefined) => (cb ? proxy(cb) : undefined);

  const cancel = () => {
    const c = current;
    current = null;
    if (c) c.worker.terminate();
    const rejects = [...pending];
    pending.clear();
    for (const r of rejects) r(new CancelledError());
  };

  return {
    simulate: (input) => call((api) => api.simulate(input)),
    summarize: (run, input) => call((api) => api.summarize(run, input)),
    forecast: (input) => call((api) => api.forecast(input)),
    ensemble: (input, ranges, runs, seed, onProgress) =>
      call((api) => api.ensemble(input, ranges, runs, seed, progress(onProgress))),
    ensembleFromSamples: (input, samples, onProgress) =>
      call((api) => api.ensembleFromSamples(input, samples, progress(onProgress))),
    fitScenario: (input) => call((api) => api.fitScenario(input)),
    fitCurve: (fit) => call((api) => api.fitCurve(fit)),
    forecastFromFit: (fit, base, runs, seed, onProgress) =>
      call((api) => api.forecastFromFit(fit, base, runs, seed, progress(onProgress))),
    cancel,
    dispose: cancel,
    get busy() {
      return pending.size > 0;
    },
  };
}

/** The app's shared client; the worker starts on the first call. */
export const forecastClient: ForecastClient = createForecastClient();
