import Link from 'next/link';

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
        {[['/field', 'Field home'], ['/entry', 'Record tallies'], ['/tallies', 'Tallies & curve'], ['/scenarios', 'Scenarios'], ['/forecast', 'Forecast'], ['/overview', 'Outbreak overview'], ['/sync', 'Sync']].map(([href, label]) => (
          <li key={href}>
            <Link href={href!} className="inline-flex min-h-touch items-center font-bold text-accent">{label}</Link>
          </li>
        ))}
      </ul>
    </main>
  );
}
