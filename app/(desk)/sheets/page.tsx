import type { Metadata } from 'next';
import { getActor } from '@/lib/auth/session';
import { may } from '@/lib/auth/permissions';
import { NotAllowed } from '@/components/shell/not-allowed';
import { listOutbreaksForActor, listSitesByOutbreak } from '@/lib/db/outbreaks';
import { listTallySheetsWithCounts } from '@/lib/db/uploads';
import { SheetsDesk } from '@/components/uploads/sheets-desk';

export const metadata: Metadata = { title: 'Tally sheets' };
export const dynamic = 'force-dynamic';

/** Paper tally sheets of an outbreak (`?outbreak=`) beside the counts they back. */
export default async function SheetsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await getActor();
  if (!actor || !may(actor, 'upload:read')) return <NotAllowed what="tally sheets" />;
  const sp = await searchParams;
  const outbreaks = await listOutbreaksForActor(actor);
  const outbreakId = typeof sp.outbreak === 'string' ? sp.outbreak : outbreaks[0]?.id;
  if (!outbreakId || !may(actor, 'upload:read', { outbreakId })) return <NotAllowed what="this outbreak's tally sheets" />;
  const [sheets, sites] = await Promise.all([listTallySheetsWithCounts(actor, outbreakId), listSitesByOutbreak(actor, outbreakId)]);
  const rows = sheets.map((s) => ({ ...s, siteName: sites.find((x) => x.id === s.siteId)?.name ?? '?' }));
  return <SheetsDesk rows={rows} sites={sites.map((s) => ({ id: s.id, name: s.name }))} canUpload={may(actor, 'upload:write', { outbreakId })} today={new Date().toISOString().slice(0, 10)} />;
}
