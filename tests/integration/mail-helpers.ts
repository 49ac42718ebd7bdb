/**
 * Mail in integration tests: the real catcher (scripts/mail-catcher.mjs) on a random loopback
 * port, and the app's own SMTP transport pointed at it. Import after '../helpers/server'.
 */
import path from 'node:path';
import { startCatcher, type Catcher } from '../../scripts/mail-catcher.mjs';
import { TEST_DIR } from '../helpers/server';

export async function startTestCatcher(): Promise<Catcher> {
  const catcher = await startCatcher({ dir: path.join(TEST_DIR, 'mail'), port: 0, quiet: true });
  process.env.SMTP_URL = catcher.url;
  process.env.MAIL_CATCHER_DIR = catcher.dir;
  return catcher;
}

/** The caught messages sent to an address, oldest first, parsed. */
export async function mailTo(address: string) {
  const { listCaughtMail, getCaughtMail } = await import('@/lib/mail/mailbox');
  return listCaughtMail({ to: address }).reverse().map((m) => getCaughtMail(m.id));
}

export function linkToken(text: string | null, page: 'invite' | 'reset'): string {
  const m = new RegExp(`/${page}\\?token=([A-Za-z0-9_-]{43})`).exec(text ?? '');
  if (!m) throw new Error(`no ${page} link in: ${text}`);
  return m[1]!;
}
