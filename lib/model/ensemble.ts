/**
 * Ensembles: many Runs of one Scenario with some parameters varied, reduced to percentile bands.
 *
 * - `ensemble` draws the varied parameters by Latin hypercube from uniform ranges with a seeded PRNG,
 *   so the same seed gives the same bands everywhere.
 * - `ensembleFromSamples` takes explicit parameter sets (e.g. draws from a Fit's uncertainty).
 * Both share the reduction. Every run is recorded daily whatever `record` says, so all share `t`.
 * Percentiles interpolate linearly between order statistics (the "type 7" rule).
 */
import { ModelError } from './errors';
import { latinHypercube, mulberry32 } from './random';
import { parseScenarioInput, simulateParsed } from './simulate';
import { bedDemand } from './summary';
import type { EnsembleResult, ParamRanges, ParamSample, Percentiles, ProgressCallback, ScenarioInput } from './types';

/** Paths an ensemble may vary (dot-joined, as in ScenarioInput). */
export const ENSEMBLE_PATH =
  /^(population|initial\.(I|E|R)|params\.(beta|gamma|sigma|omega)|vaccination\.(atStart|dailyRate|startDay)|capacity\.(admissionFraction|lengthOfStay|beds)|interventions\.\d+\.(startDay|endDay|contactReduction))$/;

/** Most runs one ensemble may hold. */
export const MAX_RUNS = 100_000;

const Q = [0.05, 0.25, 0.5, 0.75, 0.95] as const;

function checkPath(path: string, where: string): void {
  if (!ENSEMBLE_PATH.test(path)) {
    throw new ModelError('invalid_range', `${where}: '${path}' is not a parameter an ensemble can vary`, {
      field: where,
    });
  }
}

/** Sets a numeric leaf in a plain copy of the input; creates a missing optional block (e.g. vaccination). */
function setPath(root: Record<string, unknown>, path: string, value: number, where: string): void {
  const parts = path.split('.');
  let node: Record<string, unknown> | unknown[] = root;
  for (let i = 0; i < parts.length - 1; i++) {
    const key = parts[i] as string;
    const nextIsIndex = /^\d+$/.test(parts[i + 1] as string);
    const child: unknown = Array.isArray(node) ? node[Number(key)] : node[key];
    if (child === undefined || child === null) {
      if (nextIsIndex || Array.isArray(node)) {
        throw new ModelError('invalid_range', `${where}: '${path}' does not exist in this scenario`, { field: where });
      }
      const created: Record<string, unknown> = {};
      node[key] = created;
      node = created;
    } else if (typeof child === 'object') {
      node = child as Record<string, unknown> | unknown[];
    } else {
      throw new ModelError('invalid_range', `${where}: '${path}' does not exist in this scenario`, { field: where });
    }
  }
  const leaf = parts[parts.length - 1] as string;
  if (Array.isArray(node)) node[Number(leaf)] = value;
  else node[leaf] = value;
}

/** Copy of the nested blocks a sample may write into (cheaper than structuredClone per run). */
function cloneInput(s: ScenarioInput): ScenarioInput {
  const c: ScenarioInput = { ...s, initial: { ...s.initial }, params: { ...s.params } };
  if (s.vaccination) c.vaccination = { ...s.vaccination };
  if (s.capacity) c.capacity = { ...s.capacity };
  if (s.interventions) c.interventions = s.interventions.map((iv) => ({ ...iv }));
  return c;
}

/** Linear-interpolation percentile of sorted values a[off .. off+n). */
function quantileSorted(a: Float64Array, off: number, n: number, q: number): number {
  const pos = q * (n - 1);
  const lo = Math.floor(pos);
  const frac = pos - lo;
  const vLo = a[off + lo] as number;
  if (frac === 0 || lo + 1 >= n) return vLo;
  const vHi = a[off + lo + 1] as number;
  // Infinity − Infinity is NaN: a band that reaches "never" stays "never".
  return vHi === Infinity ? (frac > 0 ? Infinity : vLo) : vLo + frac * (vHi - vLo);
}

function scalarBands(values: Float64Array): Percentiles<number> {
  const s = values.slice().sort();
  const n = s.length;
  return {
    p5: quantileSorted(s, 0, n, Q[0]),
    p25: quantileSorted(s, 0, n, Q[1]),
    p50: quantileSorted(s, 0, n, Q[2]),
    p75: quantileSorted(s, 0, n, Q[3]),
    p95: quantileSorted(s, 0, n, Q[4]),
  };
}

/** Bands of a time-major matrix m[k·runs + r]; sorts each time's slice in place. */
function seriesBands(m: Float64Array, times: number, runs: number): Percentiles<Float64Array> {
  const out: Percentiles<Float64Array> = {
    p5: new Float64Array(times),
    p25: new Float64Array(times),
    p50: new Float64Array(times),
    p75: new Float64Array(times),
    p95: new Float64Array(times),
  };
  for (let k = 0; k < times; k++) {
    const off = k * runs;
    m.subarray(off, off + runs).sort();
    out.p5[k] = quantileSorted(m, off, runs, Q[0]);
    out.p25[k] = quantileSorted(m, off, runs, Q[1]);
    out.p50[k] = quantileSorted(m, off, runs, Q[2]);
    out.p75[k] = quantileSorted(m, off, runs, Q[3]);
    out.p95[k] = quantileSorted(m, off, runs, Q[4]);
  }
  return out;
}

/** Runs `count` variants of `input`, the i-th with `sampleAt(i)` applied, and reduces them. */
function runEnsemble(
  input: ScenarioInput,
  count: number,
  sampleAt: (i: number) => ParamSample,
  onProgress: ProgressCallback | undefined,
): EnsembleResult {
  if (!Number.isInteger(count) || count < 1 || count > MAX_RUNS) {
    throw new ModelError('invalid_range', `runs: must be a whole number from 1 to ${MAX_RUNS}`, { field: 'runs' });
  }
  const base = parseScenarioInput(input);
  const daily: ScenarioInput = { ...base, record: 'daily' };
  const times = base.days + 1;
  const Im = new Float64Array(times * count);
  const incM = new Float64Array(times * count);
  const cap = base.capacity;
  const bedM = cap ? new Float64Array(times * count) : null;
  const peakDay = new Float64Array(count);
  const peakI = new Float64Array(count);
  const exceeded = cap ? new Float64Array(count) : null;
  let t: Float64Array | null = null;
  const every = Math.max(1, Math.floor(count / 50));

  for (let r = 0; r < count; r++) {
    const sample = sampleAt(r);
    let variant = daily;
    const keys = Object.keys(sample);
    if (keys.length > 0) {
      const copy = cloneInput(daily) as unknown as Record<string, unknown>;
      for (const key of keys) {
        const where = `samples.${r}.${key}`;
        checkPath(key, where);
        const v = sample[key];
        if (typeof v !== 'number' || !Number.isFinite(v)) {
          throw new ModelError('invalid_range', `${where}: must be a finite number`, { field: where });
        }
        setPath(copy, key, v, where);
      }
      variant = parseScenarioInput(copy);
    }
    const { run, peak } = simulateParsed(variant);
    if (!t) t = run.t;
    const I = run.I;
    const inc = run.incidence;
    for (let k = 0; k < times; k++) {
      Im[k * count + r] = I[k] as number;
      incM[k * count + r] = inc[k] as number;
    }
    peakDay[r] = peak.day;
    peakI[r] = peak.infectious;
    if (bedM && exceeded) {
      const vc = variant.capacity ?? cap;
      if (vc) {
        const B = bedDemand(run.t, inc, vc.admissionFraction, vc.lengthOfStay);
        let first = Infinity;
        for (let k = 0; k < times; k++) {
          const b = B[k] as number;
          bedM[k * count + r] = b;
          if (first === Infinity && b > vc.beds) first = run.t[k] as number;
        }
        exceeded[r] = first;
      }
    }
    if (onProgress && ((r + 1) % every === 0 || r + 1 === count)) onProgress(r + 1, count);
  }

  const result: EnsembleResult = {
    t: t ?? new Float64Array(0),
    bands: { I: seriesBands(Im, times, count), incidence: seriesBands(incM, times, count) },
    peakDay: scalarBands(peakDay),
    peakInfectious: scalarBands(peakI),
    runs: count,
  };
  if (bedM && exceeded) {
    result.bands.bedDemand = seriesBands(bedM, times, count);
    let hit = 0;
    for (let r = 0; r < count; r++) if ((exceeded[r] as number) !== Infinity) hit++;
    result.bedsExceededDay = { ...scalarBands(exceeded), share: hit / count };
  }
  return result;
}

/**
 * `runs` Runs with each path in `ranges` drawn uniformly from [lo, hi] by Latin hypercube (seeded
 * mulberry32; the paths are taken in sorted order so key order does not change the draws).
 * A zero-width range [v, v] sets the value exactly. Progress about every 2 % of runs.
 */
export function ensemble(
  input: ScenarioInput,
  ranges: ParamRanges,
  runs: number,
  seed: number,
  onProgress?: ProgressCallback,
): EnsembleResult {
  const paths = Object.keys(ranges).sort();
  for (const path of paths) {
    const where = `ranges.${path}`;
    checkPath(path, where);
    const range = ranges[path];
    if (!range || range.length !== 2 || !Number.isFinite(range[0]) || !Number.isFinite(range[1]) || range[0] > range[1]) {
      throw new ModelError('invalid_range', `${where}: must be [low, high] with low ≤ high`, { field: where });
    }
  }
  if (!Number.isInteger(runs) || runs < 1 || runs > MAX_RUNS) {
    throw new ModelError('invalid_range', `runs: must be a whole number from 1 to ${MAX_RUNS}`, { field: 'runs' });
  }
  const dims = paths.length;
  const u = latinHypercube(runs, dims, mulberry32(seed));
  const sample: Record<string, number> = {};
  return runEnsemble(
    input,
    runs,
    (i) => {
      for (let j = 0; j < dims; j++) {
        const path = paths[j] as string;
        const [lo, hi] = ranges[path] as readonly [number, number];
        sample[path] = lo === hi ? lo : lo + (hi - lo) * (u[i * dims + j] as number);
      }
      return sample;
    },
    onProgress,
  );
}

/** One Run per explicit parameter set (path → value), reduced to the same bands as `ensemble`. */
export function ensembleFromSamples(
  input: ScenarioInput,
  samples: readonly ParamSample[],
  onProgress?: ProgressCallback,
): EnsembleResult {
  return runEnsemble(input, samples.length, (i) => samples[i] as ParamSample, onProgress);
}
