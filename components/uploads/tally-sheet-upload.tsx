'use client';
import { useCallback, useEffect, useRef, useState } from 'react';
import { Notice } from '@/components/ui/notice';
import type { QueuedSheet } from '@/lib/offline/upload-queue';
import { TallySheetLink } from './tally-sheet-link';

/** The upload queue and Dexie (about 30 kB compressed) are loaded with this component, not with the page. */
const loadQueue = () => import('@/lib/offline/upload-queue');

/**
 * Attach a photo or scan of the paper tally sheet to a site and day. Checked on the device first
 * (JPEG, PNG or PDF by its bytes, ≤ 5 MB); sent at once when online, else kept on the device and
 * sent when the network is back.
 */
export function TallySheetUpload({ siteId, date }: { siteId: string; date: string }) {
  const input = useRef<HTMLInputElement>(null);
  const [message, setMessage] = useState<{ tone: 'success' | 'error' | 'info'; text: string } | null>(null);
  const [queued, setQueued] = useState<QueuedSheet[]>([]);
  const [busy, setBusy] = useState(false);
  const [version, setVersion] = useState(0);
  // The server's HTML has the input disabled: a file picked before the page is interactive would
  // have no handler and be dropped without a word. It is enabled once this component has mounted
  // and the queue's module has loaded.
  const [ready, setReady] = useState(false);

  const refresh = useCallback(() => {
    loadQueue().then((q) => q.listQueuedSheets({ siteId, date })).then(setQueued).catch(() => setQueued([]));
  }, [siteId, date]);

  useEffect(() => {
    let gone = false;
    let off = () => {};
    void loadQueue().then((q) => {
      if (gone) return;
      setReady(true);
      q.startUploadSync();
      refresh();
      const unsubscribe = q.onUploadQueueChange(() => {
        refresh();
        setVersion((v) => v + 1);
      });
      off = () => void unsubscribe();
    }, () => {
      // The form's code did not arrive (offline before it was ever cached): say so rather than stay greyed out.
      if (!gone) setMessage({ tone: 'error', text: 'The upload form could not load. Open this page once with a network, then it works offline too.' });
    });
    return () => {
      gone = true;
      off();
    };
  }, [refresh]);

  async function onFile(file: File | undefined) {
    if (!file) return;
    setMessage(null);
    const q = await loadQueue();
    const check = await q.checkFile(file);
    if (!check.ok) {
      setMessage({ tone: 'error', text: check.message });
      if (input.current) input.current.value = '';
      return;
    }
    setBusy(true);
    const clientId = crypto.randomUUID();
    const out = navigator.onLine ? await q.sendSheet({ clientId, siteId, date, name: file.name, blob: file }) : ({ ok: false, offline: true } as const);
    if (out.ok) {
      setMessage({ tone: 'success', text: 'Sheet attached.' });
      setVersion((v) => v + 1);
    } else if (out.offline) {
      await q.queueSheet({ clientId, siteId, date, file });
      setMessage({ tone: 'info', text: 'No connection: the sheet is kept on this device and sent when the network is back.' });
    } else {
      setMessage({ tone: 'error', text: out.message });
    }
    setBusy(false);
    if (input.current) input.current.value = '';
  }

  return (
    <div className="flex flex-col gap-2" data-testid="tally-sheet-upload">
      <label className="inline-flex min-h-touch cursor-pointer items-center gap-2 self-start rounded-lg border-2 border-ink/30 bg-white px-4 font-bold hover:border-accent">
        {busy ? 'Sending…' : 'Attach paper sheet (photo or PDF)'}
        <input ref={input} type="file" accept="image/jpeg,image/png,application/pdf" className="sr-only" disabled={busy || !ready}
          onChange={(e) => void onFile(e.target.files?.[0])} />
      </label>
      <p className="text-sm text-ink/70">JPEG, PNG or PDF, at most 5 MB. Only aggregate counts: make sure the sheet shows no names.</p>
      <TallySheetLink key={version} siteId={siteId} date={date} />
      {queued.length > 0 && (
        <ul className="text-sm" data-testid="tally-sheet-queued">
          {queued.map((q) => (
            <li key={q.clientId} className="flex flex-wrap items-center gap-2">
              <span>{q.name} — {q.error ? <span className="font-bold text-warning">refused: {q.error}</span> : 'waiting to be sent'}</span>
              {q.error ? <button type="button" className="min-h-touch text-accent underline" onClick={() => void loadQueue().then((m) => m.removeQueuedSheet(q.clientId))}>Remove</button>
                : <button type="button" className="min-h-touch text-accent underline" onClick={() => void loadQueue().then((m) => m.flushUploads())}>Send now</button>}
            </li>
          ))}
        </ul>
      )}
      {message && <Notice tone={message.tone}>{message.text}</Notice>}
    </div>
  );
}
