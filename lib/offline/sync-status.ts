'use client';
import { create } from 'zustand';
import type { SyncReport } from '@/lib/sync/engine';

/** Details of the sync client beyond the header's connectivity store (lib/stores/connectivity.ts). */
export interface SyncStatus {
  /** The last sync was answered 401: the officer must sign in to sync (local work goes on). */
  needsSignIn: boolean;
  /** The outbox holds changes of another user than the one signed in: they sync when that user signs in. */
  otherUserPending: boolean;
  lastReport: SyncReport | null;
  /** ISO time of the last attempt, successful or not. */
  lastAttemptAt: string | null;
  /** When the next automatic attempt is due (back-off), ISO, or null. */
  nextRetryAt: string | null;
  deviceId: string | null;
  /** Whether the browser agreed to keep this origin's storage. */
  persisted: boolean | null;
  set: (patch: Partial<Omit<SyncStatus, 'set'>>) => void;
}

export const useSyncStatus = create<SyncStatus>()((set) => ({
  needsSignIn: false,
  otherUserPending: false,
  lastReport: null,
  lastAttemptAt: null,
  nextRetryAt: null,
  deviceId: null,
  persisted: null,
  set: (patch) => set(patch),
}));
