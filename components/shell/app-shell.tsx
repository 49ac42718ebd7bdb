'use client';
import Link from 'next/link';
import { usePathname } from 'next/navigation';
import { Suspense, useEffect, useState, type ReactNode } from 'react';
import { signOut } from 'next-auth/react';
import { HOME, NAVIGATION, navHref } from '@/lib/auth/navigation';
import { ROLE_LABEL } from '@/lib/auth/roles';
import { useMe, forgetMe } from '@/lib/data/use-me';
import { useOutbreaks } from '@/lib/data/hooks';
import { useOutbreakId } from '@/lib/data/use-outbreak-id';
import { useUiStore } from '@/lib/stores/ui';
import { useConnectivity } from '@/lib/stores/connectivity';
import { StatusIndicator } from './status-indicator';

function OutbreakSwitcher() {
  const { outbreaks } = useOutbreaks();
  const current = useOutbreakId();
  const setOutbreak = useUiStore((s) => s.setOutbreak);
  // Nothing chosen yet on this device: the first outbreak in view becomes the one in view, as the
  // field home already shows it, so the header, the navigation's links and every screen agree.
  const first = outbreaks[0]?.id;
  useEffect(() => {
    if (!current && first) setOutbreak(first);
  }, [current, first, setOutbreak]);
  if (!outbreaks.length) return null;
  return (
    <label className="flex items-center gap-2 text-sm">
      <span className="sr-only md:not-sr-only">Outbreak</span>
      <select
        data-testid="outbreak-switcher"
        className="min-h-touch max-w-48 rounded-lg border border-white/40 bg-accent-dark px-2 text-white"
        value={current ?? ''}
        onChange={(e) => {
          setOutbreak(e.target.value);
          const url = new URL(window.location.href);
          url.searchParams.set('outbreak', e.target.value);
          window.location.assign(url.toString());
        }}
      >
        {!current && <option value="">Choose…</option>}
        {outbreaks.map((o) => (
          <option key={o.id} value={o.id}>{o.name}</option>
        ))}
      </select>
    </label>
  );
}

function UserMenu() {
  const { me, fromCache } = useMe();
  const outboxSize = useConnectivity((s) => s.outboxSize);
  const [open, setOpen] = useState(false);
  // Sign-out steps while changes wait: 'warn' offers to sync first; 'confirm' is the second "yes" before deleting them.
  const [step, setStep] = useState<'menu' | 'warn' | 'confirm'>('menu');
  const [syncing, setSyncing] = useState(false);
  if (!me) {
    return <Link href="/signin" className="min-h-touch rounded-lg bg-white px-3 py-2 font-bold text-accent no-underline">Sign in</Link>;
  }
  const finish = async (clear: boolean) => {
    const { clearLocalData } = await import('@/lib/offline/sync-client');
    if (clear) await clearLocalData();
    forgetMe();
    await signOut({ callbackUrl: '/signin' });
  };
  const doSignOut = async () => {
    if (outboxSize > 0) return setStep('warn');
    await finish(true); // nothing unsynced: the next person gets a clean device
  };
  const syncFirst = async () => {
    setSyncing(true);
    try {
      const { syncNow } = await import('@/lib/offline/sync-client');
      await syncNow();
    } finally {
      setSyncing(false);
    }
  };
  return (
    <div className="relative">
      <button
        type="button"
        data-testid="user-menu"
        aria-expanded={open}
        onClick={() => {
          setOpen((v) => !v);
          setStep('menu');
        }}
        className="flex min-h-touch items-center gap-2 rounded-lg border border-white/40 px-3 text-left text-sm"
      >
        <span className="font-bold">{me.name}</span>
        <span data-testid="user-role" className="rounded bg-accent-dark px-1">{ROLE_LABEL[me.role]}</span>
        {fromCache && <span title="Shown from this device while the server is unreachable">(offline)</span>}
      </button>
      {open && (
        <div className="absolute right-0 z-20 mt-1 w-72 rounded-lg border border-line bg-panel p-2 text-ink shadow-lg" data-testid="user-menu-panel">
          <p className="px-2 py-1 text-sm text-ink/70">{me.email}</p>
          {step === 'menu' && (
            <button type="button" onClick={doSignOut} className="min-h-touch w-full rounded px-2 text-left font-bold hover:bg-paper">
              Sign out
            </button>
          )}
          {step !== 'menu' && outboxSize === 0 && (
            <div className="flex flex-col gap-2 p-2">
              <p>Everything has reached the server.</p>
              <button type="button" onClick={() => finish(true)} className="min-h-touch rounded-lg bg-accent px-3 font-bold text-white">Sign out</button>
            </div>
          )}
          {step === 'warn' && outboxSize > 0 && (
            <div className="flex flex-col gap-2 p-2" role="alert" data-testid="sign-out-warning">
              <p className="font-bold text-warning">{outboxSize} change{outboxSize === 1 ? ' has' : 's have'} not reached the server yet.</p>
              <button type="button" onClick={syncFirst} disabled={syncing} className="min-h-touch rounded-lg bg-accent px-3 font-bold text-white disabled:opacity-50">
                {syncing ? 'Syncing…' : 'Sync first'}
              </button>
              <button type="button" onClick={() => finish(false)} className="min-h-touch rounded-lg border-2 border-ink/30 px-3 font-bold">
                Sign out, keep them on this device
              </button>
              <button type="button" onClick={() => setStep('confirm')} className="min-h-touch rounded-lg px-3 text-left text-sm font-bold text-warning underline">
                Delete them and sign out…
              </button>
            </div>
          )}
          {step === 'confirm' && outboxSize > 0 && (
            <div className="flex flex-col gap-2 p-2" role="alert">
              <p className="font-bold">Really delete {outboxSize} unsynced change{outboxSize === 1 ? '' : 's'}? They cannot be recovered.</p>
              <button type="button" onClick={() => finish(true)} data-testid="confirm-delete-outbox" className="min-h-touch rounded-lg bg-warning px-3 font-bold text-white">
                Yes, delete and sign out
              </button>
              <button type="button" onClick={() => setStep('warn')} className="min-h-touch rounded-lg border-2 border-ink/30 px-3 font-bold">Go back</button>
            </div>
          )}
        </div>
      )}
    </div>
  );
}

function Nav() {
  const { me } = useMe();
  const outbreakId = useOutbreakId();
  const pathname = usePathname();
  if (!me) return null;
  return (
    <nav aria-label="Main" className="no-print border-b border-line bg-panel">
      <ul className="mx-auto flex max-w-6xl flex-wrap gap-x-1 px-2">
        {NAVIGATION[me.role].map((n) => {
          const active = pathname === n.href;
          return (
            <li key={n.href}>
              <Link
                href={navHref(n, outbreakId)}
                aria-current={active ? 'page' : undefined}
                className={`flex min-h-touch items-center whitespace-nowrap border-b-4 px-3 font-bold no-underline ${active ? 'border-accent text-accent' : 'border-transparent text-ink hover:border-line'}`}
              >
                {n.label}
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}

function Brand() {
  const { me } = useMe();
  return (
    <Link href={me ? HOME[me.role] : '/'} className="flex items-center gap-2 text-xl font-bold text-white no-underline">
      <svg aria-hidden width="28" height="28" viewBox="0 0 32 32">
        <path d="M2 24 C 8 24, 10 6, 16 6 S 24 22, 30 22" stroke="#F7F4EC" strokeWidth="3.2" fill="none" strokeLinecap="round" />
      </svg>
      Ebbcast
    </Link>
  );
}

/** The header (brand, outbreak, connectivity, user) and role navigation around every screen. */
export function AppShell({ children }: { children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col">
      <header className="no-print bg-accent text-white">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center justify-between gap-2 px-3 py-2">
          <Brand />
          <div className="flex flex-wrap items-center gap-2">
            <Suspense fallback={null}>
              <OutbreakSwitcher />
            </Suspense>
            <StatusIndicator />
            <UserMenu />
          </div>
        </div>
      </header>
      <Suspense fallback={null}>
        <Nav />
      </Suspense>
      <main className="mx-auto w-full max-w-6xl flex-1 px-3 py-4">
        <Suspense fallback={<p>Loading…</p>}>{children}</Suspense>
      </main>
    </div>
  );
}
