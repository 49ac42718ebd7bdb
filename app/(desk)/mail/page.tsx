import type { Metadata } from 'next';
import { getActor } from '@/lib/auth/session';
import { may } from '@/lib/auth/permissions';
import { NotAllowed } from '@/components/shell/not-allowed';
import { getCaughtMail, listCaughtMail, usingCatcher } from '@/lib/mail/mailbox';
import { SentMail } from '@/components/mail/sent-mail';
import { AppError } from '@/lib/http/errors';

export const metadata: Metadata = { title: 'Sent mail' };
export const dynamic = 'force-dynamic';

/** Admins: the messages the local mail catcher kept (invitations, resets, sitreps, alerts). */
export default async function MailPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await getActor();
  if (!actor || !may(actor, 'mail:read')) return <NotAllowed what="sent mail" />;
  const sp = await searchParams;
  const id = typeof sp.id === 'string' ? sp.id : null;
  const messages = listCaughtMail({ limit: 300 });
  let open = null;
  let missing = false;
  if (id) {
    try {
      open = getCaughtMail(id);
    } catch (err) {
      if (!(err instanceof AppError)) throw err;
      missing = true;
    }
  }
  return <SentMail messages={messages} open={open} missing={missing} catcher={usingCatcher()} relay={process.env.SMTP_URL ? new URL(process.env.SMTP_URL).host : null} />;
}
