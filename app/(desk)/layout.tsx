import { redirect } from 'next/navigation';
import { AppShell } from '@/components/shell/app-shell';
import { getActor } from '@/lib/auth/session';

export const dynamic = 'force-dynamic';

/** Online-only desk screens (admin, merge desk, ledger, sitrep): rendered on the server per request. */
export default async function DeskLayout({ children }: { children: React.ReactNode }) {
  const actor = await getActor();
  if (!actor) redirect('/signin');
  return <AppShell>{children}</AppShell>;
}
