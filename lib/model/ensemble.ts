/**
 * Ensembles: many Runs of one Scenario with some parameters varied, reduced to percentile bands.
 *
 * - `ensemble` draws the varied parameters by Latin hypercube from uniform ranges with a seeded PRNG,
 *   so the same seed gives the same bands everywhere.
 * - `ensembleFromSamples` takes explicit parameter sets (e.g. draws from a Fit's uncertainty).
 * Both share the reduction. Every run is recorded daily whatever `record` says, so all share `t`.
 * Percentiles interpolate linearly between order statistics (the "type 7" rule).
 *
 * Fast path (euler, rk4): members are integrated straight into the band matrices with preallocated
 * state, computing only what the bands need (I, incidence, beds, peak), never a Run; RK4 members go
 * two at a time through the two-lane kernels of lanes.ts. Each member follows simulate()'s day loop and
 * kernels exactly, so its numbers are bit-identical to simulate()'s (tests/unit/model/fast-paths.test.ts).
 * dopri5 members go through the driver itself.
 */
import { ModelError } from './errors';
import { PK_LEN, P_BN, P_G, P_LEN, P_N, P_NU, P_OM, P_SIG, Y_C, Y_I, Y_LEN, initPeak, type Kernel } from './kernels';
import { rk4SEIR2, rk4SIR2, rk4SIRS2, type Kernel2 } from './lanes';
import { refinePeak } from './peak';
import { latinHypercube, mulberry32 } from './random';
import {
  KERNELS, checkStep, initialStateInto, parseScenarioInput, segmentsOf, simulateParsed, switchTimes, type Segments,
} from './simulate';
import { bedDemandInto } from './summary';
import type {
  EnsembleResult, ModelKind, ParamRanges, ParamSample, Percentiles, ProgressCallback, ScenarioInput,
} from './types';

// Module-local copies: transpiled to CommonJS (tsx), an imported binding is a getter call per use.
const iI = Y_I, iC = Y_C, pBN = P_BN, pNU = P_NU;

const LANES2: Record<ModelKind, Kernel2> = { SIR: rk4SIR2, SEIR: rk4SEIR2, SIRS: rk4SIRS2 };

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

const nonNegative = (x: number) => x >= 0;
const fraction = (x: number) => x >= 0 && x <= 1;
const rate = (x: number) => x >= 0 && x <= 1000;
const positiveRate = (x: number) => x > 0 && x <= 1000;
/** Leaf bounds of scenarioInputSchema for each path an ensemble may vary (interventions by field). */
const LEAF_OK: Readonly<Record<string, (x: number) => boolean>> = {
  population: (x) => x > 0 && x <= 1e10,
  'initial.I': nonNegative,
  'initial.E': nonNegative,
  'initial.R': nonNegative,
  'params.beta': rate,
  'params.gamma': positiveRate,
  'params.sigma': positiveRate,
  'params.omega': rate,
  'vaccination.atStart': fraction,
  'vaccination.dailyRate': (x) => x >= 0 && x <= 10,
  'vaccination.startDay': nonNegative,
  'capacity.admissionFraction': fraction,
  'capacity.lengthOfStay': (x) => x > 0 && x <= 365,
  'capacity.beds': nonNegative,
  startDay: nonNegative,
  endDay: nonNegative,
  contactReduction: fraction,
};

/**
 * True when a variant of an input the schema has already accepted, changed only at the finite numeric
 * leaves `keys`, certainly passes scenarioInputSchema: each varied leaf is within its bounds and the
 * cross-field rules hold. The ensemble then skips the full parse (its cost per member is about that of
 * the integration's bookkeeping). False only means "let the schema decide": it then names the failing
 * field, exactly as before. tests/unit/model/fast-paths.test.ts checks it never accepts what the schema
 * rejects.
 */
export function variantPasses(v: ScenarioInput, keys: readonly string[]): boolean {
  for (const key of keys) {
    const parts = key.split('.');
    let value: unknown;
    let ok: ((x: number) => boolean) | undefined;
    if (parts[0] === 'interventions') {
      const iv = v.interventions?.[Number(parts[1])];
      if (!iv) return false;
      const field = parts[2] as string;
      value = (iv as unknown as Record<string, unknown>)[field];
      ok = LEAF_OK[field];
      if (iv.endDay !== undefined && !(iv.endDay > iv.startDay)) return false;
    } else if (parts[0] === 'capacity') {
      const c = v.capacity;
      if (!c || typeof c.admissionFraction !== 'number' || typeof c.lengthOfStay !== 'number' || typeof c.beds !== 'number') {
        return false;
      }
      value = (c as unknown as Record<string, unknown>)[parts[1] as string];
      ok = LEAF_OK[key];
    } else {
      const blocks = v as unknown as Record<string, Record<string, unknown> | undefined>;
      value = parts.length === 1 ? v.population : blocks[parts[0] as string]?.[parts[1] as string];
      ok = LEAF_OK[key];
    }
    if (!ok || typeof value !== 'number' || !ok(value)) return false;
  }
  const { I } = v.initial;
  const E = v.initial.E ?? 0;
  const R = v.initial.R ?? 0;
  const N = v.population;
  if (!(I <= N) || !(I + E + R <= N * (1 + 1e-12))) return false;
  if (v.model !== 'SEIR' && E > 0) return false;
  if (v.model === 'SEIR' && v.params.sigma === undefined) return false;
  if (v.model === 'SIRS' && v.params.omega === undefined) return false;
  return true;
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

/**
 * Bands of a time-major matrix m[k·runs + r]. The runs' order changes little from one day to the next,
 * so each day's values are gathered in the previous day's sorted order and finished by insertion sort
 * (cost ~ runs + the number of order changes, against runs·log runs for a fresh sort). A day that
 * reorders wholesale (day 1, when every run starts alike) stops the insertion sort after a budget of
 * moves and is merge-sorted instead; a day with a non-finite value gets the typed-array sort (NaN last)
 * that the plain per-day sort gave. Every path yields the same sorted values, hence the same bands.
 */
function seriesBands(m: Float64Array, times: number, runs: number): Percentiles<Float64Array> {
  const out: Percentiles<Float64Array> = {
    p5: new Float64Array(times),
    p25: new Float64Array(times),
    p50: new Float64Array(times),
    p75: new Float64Array(times),
    p95: new Float64Array(times),
  };
  const order = new Uint32Array(runs);
  for (let j = 0; j < runs; j++) order[j] = j;
  const v = new Float64Array(runs);
  const tmpV = new Float64Array(runs);
  const tmpO = new Uint32Array(runs);
  const budget = 8 * runs;
  for (let k = 0; k < times; k++) {
    const off = k * runs;
    let finite = true;
    for (let j = 0; j < runs; j++) {
      const x = m[off + (order[j] as number)] as number;
      v[j] = x;
      if (x - x !== 0) finite = false;
    }
    if (!finite) v.sort();
    else if (!insertionSort(v, order, 0, runs, budget)) mergeSort(v, order, tmpV, tmpO);
    out.p5[k] = quantileSorted(v, 0, runs, Q[0]);
    out.p25[k] = quantileSorted(v, 0, runs, Q[1]);
    out.p50[k] = quantileSorted(v, 0, runs, Q[2]);
    out.p75[k] = quantileSorted(v, 0, runs, Q[3]);
    out.p95[k] = quantileSorted(v, 0, runs, Q[4]);
  }
  return out;
}

/**
 * Sorts v[lo..hi) ascending (finite values), moving `order` along. Returns false, with v and order
 * still paired, once more than `budget` moves have been made.
 */
function insertionSort(v: Float64Array, order: Uint32Array, lo: number, hi: number, budget: number): boolean {
  let moves = 0;
  for (let j = lo + 1; j < hi; j++) {
    const x = v[j] as number;
    if (!((v[j - 1] as number) > x)) continue;
    const o = order[j] as number;
    let i = j;
    while (i > lo && (v[i - 1] as number) > x) {
      v[i] = v[i - 1] as number;
      order[i] = order[i - 1] as number;
      i--;
    }
    v[i] = x;
    order[i] = o;
    moves += j - i;
    if (moves > budget) return false;
  }
  return true;
}

/** Bottom-up merge sort of v (finite values) carrying `order`; tmpV/tmpO are scratch of the same length. */
function mergeSort(v: Float64Array, order: Uint32Array, tmpV: Float64Array, tmpO: Uint32Array): void {
  const n = v.length;
  const BLOCK = 16;
  for (let lo = 0; lo < n; lo += BLOCK) insertionSort(v, order, lo, Math.min(n, lo + BLOCK), Infinity);
  let srcV = v, srcO = order, dstV = tmpV, dstO = tmpO;
  for (let w = BLOCK; w < n; w *= 2) {
    for (let lo = 0; lo < n; lo += 2 * w) {
      const mid = Math.min(n, lo + w);
      const hi = Math.min(n, lo + 2 * w);
      let i = lo;
      let j = mid;
      let k = lo;
      while (i < mid && j < hi) {
        if ((srcV[j] as number) < (srcV[i] as number)) {
          dstV[k] = srcV[j] as number;
          dstO[k++] = srcO[j++] as number;
        } else {
          dstV[k] = srcV[i] as number;
          dstO[k++] = srcO[i++] as number;
        }
      }
      while (i < mid) {
        dstV[k] = srcV[i] as number;
        dstO[k++] = srcO[i++] as number;
      }
      while (j < hi) {
        dstV[k] = srcV[j] as number;
        dstO[k++] = srcO[j++] as number;
      }
    }
    const sv = srcV, so = srcO;
    srcV = dstV;
    srcO = dstO;
    dstV = sv;
    dstO = so;
  }
  if (srcV !== v) {
    v.set(srcV);
    order.set(srcO);
  }
}

/** Preallocated state of one member on the fast path. */
class Lane {
  readonly y = new Float64Array(Y_LEN);
  readonly p = new Float64Array(P_LEN);
  readonly pk = new Float64Array(PK_LEN);
  input: ScenarioInput | null = null;
  switches: number[] = [];
  seg: Segments | null = null;
  /** Member index (column of the band matrices). */
  r = 0;
  /** Cumulative infections at the last recorded day, people. */
  cPrev = 0;

  /** Loads a validated, step-checked member exactly as simulateParsed sets up its run. */
  load(input: ScenarioInput, r: number): void {
    this.input = input;
    this.r = r;
    initialStateInto(this.y, input);
    initPeak(this.pk, this.y);
    const p = this.p;
    p[P_N] = input.population;
    p[P_G] = input.params.gamma;
    p[P_SIG] = input.params.sigma ?? 0;
    p[P_OM] = input.params.omega ?? 0;
    this.switches = switchTimes(input);
    this.seg = segmentsOf(input, this.switches);
    this.cPrev = 0;
  }
}

const sameTimes = (a: readonly number[], b: readonly number[]) => a.length === b.length && a.every((x, i) => x === b[i]);

/**
 * simulate()'s daily fixed-step loop for one member (B null) or two with the same switch times,
 * writing I and incidence of each whole day into column r of the time-major matrices. Pieces where a
 * lane vaccinates run each lane through its kernels.ts kernel (the two-lane kernels have no ν term).
 * For SIR and SEIR y[Y_R] is not kept up to date (see lanes.ts); nothing here reads it.
 */
function integrateDaily(
  A: Lane,
  B: Lane | null,
  kern: Kernel,
  kern2: Kernel2 | null,
  h: number,
  days: number,
  Im: Float64Array,
  incM: Float64Array,
  count: number,
): void {
  const sa = A.seg as Segments;
  const sb = B ? (B.seg as Segments) : sa;
  const { nSeg, segEnd } = sa;
  const yA = A.y, pA = A.p, pkA = A.pk;
  const yB = B ? B.y : yA, pB = B ? B.p : pA, pkB = B ? B.pk : pkA;
  const two = B !== null && kern2 !== null;
  const thr = 1e-9 * h;
  Im[A.r] = yA[iI] as number;
  incM[A.r] = 0;
  if (B) {
    Im[B.r] = yB[iI] as number;
    incM[B.r] = 0;
  }
  let seg = 0;
  // Without switches every day is the one piece [d, d + 1]: the same n steps and tail each day.
  const plain = nSeg === 1 && two && sa.segNU[0] === 0 && sb.segNU[0] === 0;
  if (plain) {
    pA[pBN] = sa.segBN[0] as number;
    pA[pNU] = 0;
    pB[pBN] = sb.segBN[0] as number;
    pB[pNU] = 0;
  }
  const n1 = Math.floor(1 / h + 1e-9);
  const r1 = 1 - n1 * h;
  const tail1 = r1 > thr;
  for (let d = 0; d < days; d++) {
    let a = d;
    const dayEnd = d + 1;
    if (plain) {
      const k2 = kern2 as Kernel2;
      if (n1 > 0) k2(yA, pA, pkA, yB, pB, pkB, a, h, n1);
      if (tail1) k2(yA, pA, pkA, yB, pB, pkB, a + n1 * h, r1, 1);
      a = dayEnd;
    }
    while (a < dayEnd) {
      while (seg < nSeg - 1 && (segEnd[seg] as number) <= a) seg++;
      const se = segEnd[seg] as number;
      const b = se < dayEnd ? se : dayEnd;
      pA[pBN] = sa.segBN[seg] as number;
      pA[pNU] = sa.segNU[seg] as number;
      pB[pBN] = sb.segBN[seg] as number;
      pB[pNU] = sb.segNU[seg] as number;
      const L = b - a;
      const n = Math.floor(L / h + 1e-9);
      const r = L - n * h;
      const tail = r > thr;
      if (two && pA[pNU] === 0 && pB[pNU] === 0) {
        const k2 = kern2 as Kernel2;
        if (n > 0) k2(yA, pA, pkA, yB, pB, pkB, a, h, n);
        if (tail) k2(yA, pA, pkA, yB, pB, pkB, a + n * h, r, 1);
      } else {
        if (n > 0) kern(yA, pA, a, h, n, pkA);
        if (tail) kern(yA, pA, a + n * h, r, 1, pkA);
        if (B) {
          if (n > 0) kern(yB, pB, a, h, n, pkB);
          if (tail) kern(yB, pB, a + n * h, r, 1, pkB);
        }
      }
      a = b;
    }
    const row = dayEnd * count;
    Im[row + A.r] = yA[iI] as number;
    const cA = yA[iC] as number;
    incM[row + A.r] = cA - A.cPrev;
    A.cPrev = cA;
    if (B) {
      Im[row + B.r] = yB[iI] as number;
      const cB = yB[iC] as number;
      incM[row + B.r] = cB - B.cPrev;
      B.cPrev = cB;
    }
  }
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
  const { days, model, method, step: h } = base;
  const times = days + 1;
  const t = new Float64Array(times);
  for (let k = 0; k < times; k++) t[k] = k;
  const Im = new Float64Array(times * count);
  const incM = new Float64Array(times * count);
  const cap = base.capacity;
  const bedM = cap ? new Float64Array(times * count) : null;
  const incRow = new Float64Array(times);
  const bedRow = new Float64Array(times);
  const peakDay = new Float64Array(count);
  const peakI = new Float64Array(count);
  const exceeded = cap ? new Float64Array(count) : null;
  const every = Math.max(1, Math.floor(count / 50));
  const kern = method === 'dopri5' ? null : KERNELS[method][model];
  const kern2 = method === 'rk4' ? LANES2[model] : null;
  const lanes = [new Lane(), new Lane()] as const;

  const variantAt = (r: number): ScenarioInput => {
    const sample = sampleAt(r);
    const keys = Object.keys(sample);
    if (keys.length === 0) return daily;
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
    const variant = copy as unknown as ScenarioInput;
    return variantPasses(variant, keys) ? variant : parseScenarioInput(variant);
  };

  // Peak, beds and progress of member r once its I and incidence columns are written.
  const finish = (r: number, variant: ScenarioInput, peak: { day: number; infectious: number }) => {
    peakDay[r] = peak.day;
    peakI[r] = peak.infectious;
    if (bedM && exceeded) {
      const vc = variant.capacity ?? cap;
      if (vc) {
        for (let k = 0; k < times; k++) incRow[k] = incM[k * count + r] as number;
        const B = bedDemandInto(bedRow, t, incRow, vc.admissionFraction, vc.lengthOfStay);
        let first = Infinity;
        for (let k = 0; k < times; k++) {
          const b = B[k] as number;
          bedM[k * count + r] = b;
          if (first === Infinity && b > vc.beds) first = t[k] as number;
        }
        exceeded[r] = first;
      }
    }
    if (onProgress && ((r + 1) % every === 0 || r + 1 === count)) onProgress(r + 1, count);
  };
  const finishLane = (lane: Lane) => {
    const v = lane.input as ScenarioInput;
    finish(lane.r, v, refinePeak(lane.pk, model, v.params.gamma, v.params.sigma ?? 0));
  };

  let waiting = false;
  for (let r = 0; r < count; r++) {
    const variant = variantAt(r);
    if (!kern) {
      const { run, peak } = simulateParsed(variant);
      const I = run.I;
      const inc = run.incidence;
      for (let k = 0; k < times; k++) {
        Im[k * count + r] = I[k] as number;
        incM[k * count + r] = inc[k] as number;
      }
      finish(r, variant, peak);
      continue;
    }
    checkStep(variant);
    if (!waiting) {
      lanes[0].load(variant, r);
      waiting = true;
      if (r + 1 < count) continue;
      integrateDaily(lanes[0], null, kern, null, h, days, Im, incM, count);
      finishLane(lanes[0]);
    } else {
      lanes[1].load(variant, r);
      waiting = false;
      const [A, B] = lanes;
      if (sameTimes(A.switches, B.switches)) {
        integrateDaily(A, B, kern, kern2, h, days, Im, incM, count);
      } else {
        integrateDaily(A, null, kern, null, h, days, Im, incM, count);
        integrateDaily(B, null, kern, null, h, days, Im, incM, count);
      }
      finishLane(A);
      finishLane(B);
    }
  }

  const result: EnsembleResult = {
    t,
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
