'use client';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { apiFetch, ApiError } from '@/lib/data/api';

/** Print and "Send to coordinators" (coordinators only); hidden on paper. */
export function SitrepActions({ outbreakId, canSend }: { outbreakId: string; canSend: boolean }) {
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);

  async function send() {
    setBusy(true);
    setMessage(null);
    try {
      const res = await apiFetch<{ recipients: string[] }>(`/api/outbreaks/${outbreakId}/sitrep/send`, { method: 'POST', json: {} });
      setMessage({ tone: 'success', text: `Sent to ${res.recipients.length} coordinator${res.recipients.length === 1 ? '' : 's'}: ${res.recipients.join(', ')}.` });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'Could not send the sitrep.' });
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="no-print flex flex-col gap-2">
      <div className="flex flex-wrap gap-2">
        <Button variant="secondary" onClick={() => window.print()}>Print (A4)</Button>
        {canSend && <Button onClick={send} disabled={busy}>{busy ? 'Sending…' : 'Send to coordinators'}</Button>}
      </div>
      {message && <div data-testid="sitrep-send-message"><Notice tone={message.tone}>{message.text}</Notice></div>}
    </div>
  );
}
