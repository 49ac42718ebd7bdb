import Link from 'next/link';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import type { CaughtMail, CaughtMailSummary } from '@/lib/mail/mailbox';
import { formatWhen } from '@/lib/mail/format';

export interface SentMailProps {
  messages: CaughtMailSummary[];
  open: CaughtMail | null;
  missing: boolean;
  catcher: boolean;
  /** host:port of the SMTP server in use, when known. */
  relay: string | null;
}

/** The sent-mail screen: the caught messages, newest first, and the one opened. */
export function SentMail({ messages, open, missing, catcher, relay }: SentMailProps) {
  return (
    <div className="flex flex-col gap-4">
      <h1>Sent mail</h1>
      {catcher ? (
        <Notice>
          No mail server is configured, so Ebbcast keeps every message it sends on this machine{relay ? ` (local catcher on ${relay})` : ''}. Nothing leaves the
          server. Set <code>SMTP_URL</code> to deliver mail for real.
        </Notice>
      ) : (
        <Notice tone="caution">Mail is delivered through {relay ?? 'the configured server'}; this list shows only what a local catcher kept earlier.</Notice>
      )}
      {missing && <Notice tone="error">That message was not found.</Notice>}
      {open && (
        <Card title={open.subject || '(no subject)'} actions={<Link href="/mail" className="text-accent">Close</Link>}>
          <dl className="mb-3 grid grid-cols-[auto_1fr] gap-x-3 text-sm">
            <dt className="font-bold">To</dt><dd data-testid="mail-to">{open.to.join(', ')}</dd>
            <dt className="font-bold">From</dt><dd>{open.headers.from ?? open.from}</dd>
            <dt className="font-bold">Received</dt><dd>{formatWhen(new Date(open.receivedAt))}</dd>
          </dl>
          <pre data-testid="mail-text" className="whitespace-pre-wrap break-words rounded-lg border border-line bg-white p-3 font-mono text-sm">{open.text ?? '(no text part)'}</pre>
          {open.html && (
            <details className="mt-3">
              <summary className="min-h-touch cursor-pointer font-bold">HTML part (source)</summary>
              <pre className="max-h-96 overflow-auto whitespace-pre-wrap break-words rounded-lg border border-line bg-white p-3 font-mono text-xs">{open.html}</pre>
            </details>
          )}
        </Card>
      )}
      <div className="overflow-x-auto rounded-xl border border-line bg-panel">
        <table className="w-full text-left" data-testid="mail-table">
          <thead className="border-b border-line">
            <tr><th className="p-2">Received</th><th className="p-2">To</th><th className="p-2">Subject</th></tr>
          </thead>
          <tbody>
            {messages.length === 0 && (
              <tr><td colSpan={3} className="p-3 text-ink/70">No messages yet. Invitations, reset links, sitreps and capacity alerts appear here.</td></tr>
            )}
            {messages.map((m) => (
              <tr key={m.id} className={`border-b border-line/60 ${open?.id === m.id ? 'bg-accent/10' : ''}`}>
                <td className="whitespace-nowrap p-2">{formatWhen(new Date(m.receivedAt))}</td>
                <td className="p-2">{m.to.join(', ')}</td>
                <td className="p-2"><Link href={`/mail?id=${encodeURIComponent(m.id)}`} className="inline-flex min-h-touch items-center text-accent">{m.subject || '(no subject)'}</Link></td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
