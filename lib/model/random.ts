/**
 * Seeded pseudo-random numbers for reproducible ensembles: mulberry32 (32-bit state, period 2³²),
 * ample for a few thousand Latin-hypercube draws and identical on every JavaScript engine.
 */
export type Rng = () => number;

/** Uniform numbers in [0, 1) from a 32-bit integer seed. */
export function mulberry32(seed: number): Rng {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Fisher–Yates shuffle of 0..n−1. */
export function permutation(n: number, rng: Rng): Uint32Array {
  const p = new Uint32Array(n);
  for (let i = 0; i < n; i++) p[i] = i;
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(rng() * (i + 1));
    const tmp = p[i] as number;
    p[i] = p[j] as number;
    p[j] = tmp;
  }
  return p;
}

/**
 * Latin hypercube on [0, 1)^dims: in every dimension each of the `runs` equal strata holds exactly one
 * point. Returns a runs × dims row-major matrix.
 */
export function latinHypercube(runs: number, dims: number, rng: Rng): Float64Array {
  const out = new Float64Array(runs * dims);
  for (let j = 0; j < dims; j++) {
    const perm = permutation(runs, rng);
    for (let i = 0; i < runs; i++) out[i * dims + j] = ((perm[i] as number) + rng()) / runs;
  }
  return out;
}
