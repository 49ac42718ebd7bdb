/** One figure measured by a benchmark. `target` is the goal stated in the issue, for the table only. */
export interface BenchRow {
  name: string;
  value: number;
  unit: string;
  target?: string;
}

/** A benchmark module: `bench/<area>.bench.ts` default-exports one of these. */
export type Bench = () => Promise<BenchRow[]>;
