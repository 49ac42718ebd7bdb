import Link from 'next/link';
import { NAVIGATION } from '@/lib/auth/navigation';

/** Every screen some role's navigation marks as working offline, once each, field officers' first. */
const OFFLINE_SCREENS = [...new Map(Object.values(NAVIGATION).flat().filter((n) => n.offline).map((n) => [n.href, n])).values()];

/** Shown by the service worker for any page that needs the network and is not cached. */
export default function OfflinePage() {
  return (
    <main className="mx-auto flex min-h-screen max-w-xl flex-col justify-center gap-4 px-4">
      <h1>This page needs a network</h1>
      <p>
        You are offline, and this screen is one that only works online (the merge desk, the ledger, administration). The
        field screens keep working on this device:
      </p>
      <ul className="flex flex-col gap-2">
        {OFFLINE_SCREENS.map(({ href, label }) => (
          <li key={href}>
            <Link href={href} className="inline-flex min-h-touch items-center font-bold text-accent">{href === '/field' ? 'Field home' : label}</Link>
          </li>
        ))}
      </ul>
    </main>
  );
}
