import Link from 'next/link';

/** What a desk page shows to a signed-in user whose role or scope does not include it. */
export function NotAllowed({ what }: { what: string }) {
  return (
    <div className="flex flex-col gap-2" data-testid="not-allowed">
      <h1>Not available for your role</h1>
      <p>Your role or team does not include {what}. Ask a coordinator or an administrator if you need it.</p>
      <Link href="/" className="font-bold text-accent">Back to the start</Link>
    </div>
  );
}
