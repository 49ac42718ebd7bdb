'use client';
import Link from 'next/link';
import { useConnectivity } from '@/lib/stores/connectivity';
import { Notice } from '@/components/ui/notice';

/** Desk screens work only online; when the network is gone they say so (and what still works). */
export function OnlineOnlyNotice({ what }: { what: string }) {
  const online = useConnectivity((s) => s.online);
  if (online) return null;
  return (
    <Notice tone="caution" className="mb-3">
      <p className="font-bold" data-testid="offline-desk-notice">You are offline: {what} needs a network.</p>
      <p>
        What is shown may be out of date and cannot be changed now. Tallies and forecasts keep working on this device:{' '}
        <Link href="/sync" className="font-bold text-accent">Sync</Link>
      </p>
    </Notice>
  );
}
