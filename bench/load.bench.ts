/**
 * The CI-sized form of bench/load.ts: a production server on loopback, 10 connections for 5 s on
 * an authenticated read and on the sync push, and a 20-second soak of 3 devices syncing every
 * second. The full form (50 connections × 30 s, 10-minute soak): `npx tsx bench/load.ts`.
 */
import type { BenchRow } from './types';
import { runLoad } from './load';

export default async function loadBench(): Promise<BenchRow[]> {
  return runLoad({ seconds: 5, connections: 10, soakSeconds: 20, port: 3938 });
}
