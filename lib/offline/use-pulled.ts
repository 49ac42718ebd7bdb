'use client';
import { useLive } from './use-live';

/**
 * Whether a pull has ever completed on this device (its cursor moved): until then the local
 * database is not yet a copy of the server, and the data hooks answer from the API instead.
 * `undefined` while the database is being read.
 */
export function usePulled(): boolean | undefined {
  return useLive(async (db) => Number((await db.meta.get('cursor'))?.value ?? 0) > 0, []);
}
