/**
 * The worker bridge over a real comlink channel: a Node MessageChannel stands in for the Worker (same
 * structured clone and transfer rules), with the real worker API exposed on the other port.
 */
import { MessageChannel, type MessagePort } from 'node:worker_threads';
import { expose, type Endpoint } from 'comlink';
import { afterEach, describe, expect, it } from 'vitest';
import { ModelError, simulate, summarize } from '@/lib/model';
import { forecastWorkerApi } from '@/workers/forecast.worker';
import { CancelledError, createForecastClient, isCancelledError, type WorkerLike } from '@/lib/worker/forecast-client';
import { canonical } from './cases';

const ports: MessagePort[] = [];
afterEach(() => {
  for (const p of ports.splice(0)) p.close();
});

function fakeWorker(api: object): { make: () => WorkerLike; started: () => number; terminated: () => number } {
  let started = 0;
  let terminated = 0;
  return {
    make: () => {
      started++;
      const { port1, port2 } = new MessageChannel();
      ports.push(port1, port2);
      expose(api, port2 as unknown as Endpoint);
      const ep = port1 as unknown as Endpoint;
      return Object.assign(ep, {
        terminate: () => {
          terminated++;
          port1.close();
          port2.close();
        },
      }) as WorkerLike;
    },
    started: () => started,
    terminated: () => terminated,
  };
}

describe('forecast client', () => {
  it('starts lazily and returns the same Run and Summary as the engine, typed arrays intact', async () => {
    const w = fakeWorker(forecastWorkerApi);
    const client = createForecastClient(w.make);
    expect(w.started()).toBe(0);
    const { run, summary } = await client.forecast({ ...canonical, step: 0.1 });
    expect(w.started()).toBe(1);
    const local = simulate({ ...canonical, step: 0.1 });
    expect(run.I).toBeInstanceOf(Float64Array);
    expect(Array.from(run.I)).toEqual(Array.from(local.I));
    expect(summary.peakDay).toBe(summarize(local, { ...canonical, step: 0.1 }).peakDay);
    client.dispose();
  });

  it('rebuilds ModelError with its field and largest safe step', async () => {
    const client = createForecastClient(fakeWorker(forecastWorkerApi).make);
    const err = await client
      .simulate({ ...canonical, population: 1000, initial: { I: 500 }, params: { beta: 3, gamma: 0.1 }, method: 'euler' })
      .catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ModelError);
    expect((err as ModelError).code).toBe('unsafe_step');
    expect((err as ModelError).field).toBe('step');
    expect((err as ModelError).largestSafeStep).toBeCloseTo(1 / 3, 12);
    client.dispose();
  });

  it('passes ensemble progress back through a proxy', async () => {
    const client = createForecastClient(fakeWorker(forecastWorkerApi).make);
    const seen: number[] = [];
    const r = await client.ensemble(canonical, { 'params.beta': [0.45, 0.55] }, 100, 1, (done) => seen.push(done));
    expect(r.runs).toBe(100);
    // Progress messages may still be in flight when the result lands; give them a turn.
    await new Promise((res) => setTimeout(res, 50));
    expect(seen.length).toBe(50);
    expect(seen[seen.length - 1]).toBe(100);
    client.dispose();
  });

  it('cancel() rejects the pending call with CancelledError, terminates, and restarts lazily', async () => {
    const never = { simulate: () => new Promise(() => undefined) };
    const w = fakeWorker(never);
    const client = createForecastClient(w.make);
    const pending = client.simulate(canonical);
    expect(client.busy).toBe(true);
    client.cancel();
    const err = await pending.catch((e: unknown) => e);
    expect(err).toBeInstanceOf(CancelledError);
    expect(isCancelledError(err)).toBe(true);
    expect(w.terminated()).toBe(1);
    expect(client.busy).toBe(false);
    const again = client.simulate(canonical);
    expect(w.started()).toBe(2);
    client.cancel();
    await expect(again).rejects.toBeInstanceOf(CancelledError);
  });
});
