'use client';
import { useEffect } from 'react';
import { useConnectivity } from '@/lib/stores/connectivity';

function ago(iso: string | null): string {
  if (!iso) return 'never';
  const s = Math.round((Date.now() - new Date(iso).getTime()) / 1000);
  if (s < 60) return 'just now';
  if (s < 3600) return `${Math.round(s / 60)} min ago`;
  if (s < 86400) return `${Math.round(s / 3600)} h ago`;
  return new Date(iso).toLocaleDateString();
}

/** Online/offline, outbox size and last sync, always visible in the header. */
export function StatusIndicator() {
  const { online, outboxSize, lastSyncAt, syncing, set } = useConnectivity();
  useEffect(() => {
    const update = () => set({ online: navigator.onLine });
    update();
    window.addEventListener('online', update);
    window.addEventListener('offline', update);
    return () => {
      window.removeEventListener('online', update);
      window.removeEventListener('offline', update);
    };
  }, [set]);
  return (
    <a href="/sync" data-testid="status-indicator" className="flex min-h-touch items-center gap-2 rounded-lg border border-white/30 px-2 text-sm no-underline">
      <span
        aria-hidden
        className={`inline-block h-3 w-3 rounded-full ${online ? 'bg-[#9FD9A0]' : 'bg-[#F2B8A2]'} ${online ? '' : 'ring-2 ring-white'}`}
      />
      <span data-testid="online-state">{online ? 'Online' : 'Offline'}</span>
      <span className="num" data-testid="outbox-size" title="Changes waiting to sync">
        · {outboxSize} to sync
      </span>
      <span className="hidden md:inline" data-testid="last-sync">· {syncing ? 'syncing…' : `synced ${ago(lastSyncAt)}`}</span>
    </a>
  );
}
