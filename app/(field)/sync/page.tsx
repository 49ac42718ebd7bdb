import type { Metadata } from 'next';
import { SyncScreen } from '@/components/sync/sync-screen';

export const metadata: Metadata = { title: 'Sync' };

/** A static client shell: everything it shows comes from this device's database. */
export default function SyncPage() {
  return <SyncScreen />;
}
