'use client';
import { create } from 'zustand';

/**
 * What the header shows: online or not, how many changes wait in the outbox, when the last sync
 * succeeded. The sync client (lib/offline) keeps it current.
 */
interface ConnectivityState {
  online: boolean;
  outboxSize: number;
  /** ISO time of the last successful sync, or null. */
  lastSyncAt: string | null;
  syncing: boolean;
  lastError: string | null;
  set: (patch: Partial<Omit<ConnectivityState, 'set'>>) => void;
}

export const useConnectivity = create<ConnectivityState>()((set) => ({
  online: typeof navigator === 'undefined' ? true : navigator.onLine,
  outboxSize: 0,
  lastSyncAt: null,
  syncing: false,
  lastError: null,
  set: (patch) => set(patch),
}));
