/**
 * The forecast worker: exposes the pure engine (lib/model) through comlink. Typed arrays in results
 * are transferred, not copied. ModelErrors are thrown as plain data (comlink would keep only the
 * message of an Error) and rebuilt by lib/worker/forecast-client.ts.
 */
import { expose, transfer } from 'comlink';
import {
  ModelError, ensemble, ensembleFromSamples, fitCurve, fitScenario, forecastFromFit, simulate, summarize,
} from '../lib/model';

/** Every distinct ArrayBuffer under a result (plain objects and arrays only). */
function buffers(value: unknown, out = new Set<ArrayBuffer>()): ArrayBuffer[] {
  if (ArrayBuffer.isView(value)) {
    if (value.buffer instanceof ArrayBuffer) out.add(value.buffer);
  } else if (Array.isArray(value)) {
    for (const v of value) buffers(v, out);
  } else if (typeof value === 'object' && value !== null) {
    for (const v of Object.values(value)) buffers(v, out);
  }
  return [...out];
}

/** Runs fn, transfers its result's buffers, and turns a ModelError into cloneable data. */
function guarded<A extends unknown[], R>(fn: (...args: A) => R): (...args: A) => R {
  return (...args: A) => {
    try {
      const result = fn(...args);
      return transfer(result, buffers(result));
    } catch (e) {
      throw e instanceof ModelError ? e.toJSON() : e;
    }
  };
}

export const forecastWorkerApi = {
  simulate: guarded(simulate),
  /** Prefer `forecast`: a Run that crossed postMessage has lost its step-level peak, so this re-integrates. */
  summarize: guarded(summarize),
  /** simulate + summarize in one round trip. */
  forecast: guarded((input: Parameters<typeof simulate>[0]) => {
    const run = simulate(input);
    return { run, summary: summarize(run, input) };
  }),
  ensemble: guarded(ensemble),
  ensembleFromSamples: guarded(ensembleFromSamples),
  // Fitting (lib/model/estimate), added by the estimation engineer's exports in lib/model/index.ts.
  fitScenario: guarded(fitScenario),
  fitCurve: guarded(fitCurve),
  forecastFromFit: guarded(forecastFromFit),
};

export type ForecastWorkerApi = typeof forecastWorkerApi;

// Only inside a worker: importing this module elsewhere (tests) must not hijack the global scope.
const scope = globalThis as { WorkerGlobalScope?: abstract new () => unknown };
if (scope.WorkerGlobalScope && globalThis instanceof scope.WorkerGlobalScope) expose(forecastWorkerApi);
