'use client';
import Link from 'next/link';
import { useEffect, useState } from 'react';
import { useConnectivity } from '@/lib/stores/connectivity';
import { loadSync } from '@/lib/offline/lazy';
import { useSyncStatus } from '@/lib/offline/sync-status';

export function ago(iso: string | null, now = Date.now()): string {
  if (!iso) return 'never';
  const s = Math.round((now - new Date(iso).getTime()) / 1000);
  if (s < 60) return 'just now';
  if (s < 3600) return `${Math.round(s / 60)} min ago`;
  if (s < 86400) return `${Math.round(s / 3600)} h ago`;
  return new Date(iso).toLocaleDateString();
}

/**
 * Online/offline, outbox size and last successful sync, always visible in the header (PRODUCT.md
 * item 9). Mounting it starts the tab's sync client; a 401 from a sync shows "Sign in to sync".
 */
export function StatusIndicator() {
  const { online, outboxSize, lastSyncAt, syncing, lastError } = useConnectivity();
  const needsSignIn = useSyncStatus((s) => s.needsSignIn);
  const [, tick] = useState(0);
  useEffect(() => {
    void loadSync().then((m) => m.startSyncClient());
    const t = setInterval(() => tick((n) => n + 1), 30_000);
    return () => clearInterval(t);
  }, []);
  return (
    <div className="flex flex-wrap items-center gap-2">
      <Link
        href="/sync"
        prefetch={false}
        data-testid="status-indicator"
        title={lastError ?? undefined}
        className="flex min-h-touch items-center gap-2 rounded-lg border border-white/30 px-2 text-sm text-white no-underline"
      >
        <span
          aria-hidden
          className={`inline-block h-3 w-3 rounded-full ${online ? 'bg-[#9FD9A0]' : 'bg-[#F2B8A2] ring-2 ring-white'}`}
        />
        <span data-testid="online-state">{online ? 'Online' : 'Offline'}</span>
        <span className="num" data-testid="outbox-size" title="Changes waiting to sync">
          · {outboxSize} to sync
        </span>
        <span className="hidden md:inline" data-testid="last-sync">
          · {syncing ? 'syncing…' : `synced ${ago(lastSyncAt)}`}
        </span>
      </Link>
      {needsSignIn && (
        <Link href="/signin?callbackUrl=%2Fsync" data-testid="sign-in-to-sync" className="flex min-h-touch items-center rounded-lg bg-white px-3 text-sm font-bold text-warning no-underline">
          Sign in to sync
        </Link>
      )}
    </div>
  );
}
