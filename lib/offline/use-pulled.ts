'use client';
import { localDb } from './db';
import { useLive } from './use-live';

/**
 * Whether a pull has ever completed on this device (its cursor moved): until then the local
 * database is not yet a copy of the server, and the data hooks answer from the API instead.
 * `undefined` while the database is being read.
 */
export function usePulled(): boolean | undefined {
  return useLive(async () => Number((await localDb().meta.get('cursor'))?.value ?? 0) > 0, []);
}
