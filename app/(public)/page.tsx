import Link from 'next/link';
import { Cautions } from '@/components/cautions';

/** The public start page: what Ebbcast is for, and the cautions. Static, so it opens offline. */
export default function LandingPage() {
  return (
    <main className="mx-auto flex min-h-screen max-w-3xl flex-col gap-6 px-4 py-10">
      <div className="flex items-center gap-3">
        <svg aria-hidden width="44" height="44" viewBox="0 0 32 32">
          <rect width="32" height="32" rx="7" fill="#1F6F78" />
          <path d="M3 24 C 9 24, 11 7, 16 7 S 23 21, 29 21" stroke="#F7F4EC" strokeWidth="3" fill="none" strokeLinecap="round" />
        </svg>
        <h1 className="text-3xl">Ebbcast</h1>
      </div>
      <p className="text-xl leading-relaxed">
        Ebbcast helps outbreak field teams count, understand and plan. Record the new cases seen each day at each site — on a
        tablet, even with no network — and see the epidemic curve, how fast it is growing, when the wave may peak and how
        many beds it may need. Coordinators merge what the teams send; supervisors audit who synced what.
      </p>
      <div className="flex flex-wrap gap-3">
        <Link href="/signin" className="inline-flex min-h-14 items-center rounded-lg bg-accent px-6 text-lg font-bold text-white no-underline">
          Sign in
        </Link>
        <Link href="/field" className="inline-flex min-h-14 items-center rounded-lg border-2 border-accent px-6 text-lg font-bold text-accent no-underline">
          Open the field app
        </Link>
      </div>
      <ul className="grid gap-3 sm:grid-cols-2">
        {[
          ['Tallies', 'Daily counts per site: new cases and, where known, recoveries, deaths and admissions.'],
          ['Epi curve', 'Daily incidence, a 7-day average and cumulative cases, per site or for the whole outbreak.'],
          ['Scenarios', 'SIR, SEIR and SIRS models with vaccination and contact reduction, solved step by step.'],
          ['Forecasts', 'Fits to the tallies with uncertainty bands, peak timing and bed demand.'],
        ].map(([title, text]) => (
          <li key={title} className="rounded-xl border border-line bg-panel p-4">
            <h2>{title}</h2>
            <p>{text}</p>
          </li>
        ))}
      </ul>
      <Cautions />
    </main>
  );
}
