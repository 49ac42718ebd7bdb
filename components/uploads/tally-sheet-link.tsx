'use client';
import { useEffect, useState } from 'react';
import { apiFetch } from '@/lib/data/api';

export interface TallySheetSummary {
  id: string;
  siteId: string;
  date: string;
  mimeType: 'image/jpeg' | 'image/png' | 'application/pdf';
  size: number;
  originalName: string;
  uploadedByName: string | null;
  url: string;
}

const KIND = { 'image/jpeg': 'photo', 'image/png': 'image', 'application/pdf': 'PDF' } as const;

/**
 * The paper tally sheet(s) behind a site's count for a day, as links that open the file. For a
 * table of many rows, pass `sheets` (from one GET /api/uploads?outbreakId=…) instead of letting
 * every row fetch its own. Shows nothing when there is no sheet.
 */
export function TallySheetLink({ siteId, date, sheets }: { siteId: string; date: string; sheets?: TallySheetSummary[] }) {
  const [own, setOwn] = useState<TallySheetSummary[] | null>(null);
  useEffect(() => {
    if (sheets) return;
    let live = true;
    apiFetch<{ sheets: TallySheetSummary[] }>(`/api/uploads?siteId=${encodeURIComponent(siteId)}&date=${encodeURIComponent(date)}`)
      .then((r) => live && setOwn(r.sheets))
      .catch(() => live && setOwn([]));
    return () => {
      live = false;
    };
  }, [siteId, date, sheets]);
  const list = (sheets ?? own ?? []).filter((s) => s.siteId === siteId && s.date === date);
  if (!list.length) return null;
  return (
    <span className="inline-flex flex-wrap gap-2" data-testid="tally-sheet-link">
      {list.map((s, i) => (
        <a key={s.id} href={s.url} target="_blank" rel="noopener" className="inline-flex min-h-touch items-center gap-1 text-accent"
          title={`${s.originalName} · ${(s.size / 1024).toFixed(0)} KiB${s.uploadedByName ? ` · sent by ${s.uploadedByName}` : ''}`}>
          <svg width="16" height="18" viewBox="0 0 16 18" aria-hidden><path d="M2 1h8l4 4v12H2z" fill="none" stroke="currentColor" strokeWidth="1.6" /><path d="M5 9h6M5 12h6" stroke="currentColor" strokeWidth="1.4" /></svg>
          Sheet{list.length > 1 ? ` ${i + 1}` : ''} ({KIND[s.mimeType]})
        </a>
      ))}
    </span>
  );
}
