'use client';
import { useState } from 'react';
import { apiFetch, ApiError } from '@/lib/data/api';
import { Button } from '@/components/ui/button';

/** "Verify chain": recomputes every row's hash on the server and says whether any row was altered or removed. */
export function LedgerVerify() {
  const [state, setState] = useState<{ ok: boolean; rows: number; firstBadId?: number } | { error: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const run = async () => {
    setBusy(true);
    try {
      setState(await apiFetch<{ ok: boolean; rows: number; firstBadId?: number }>('/api/ledger/verify'));
    } catch (err) {
      setState({ error: err instanceof ApiError ? err.message : 'The check did not reach the server.' });
    } finally {
      setBusy(false);
    }
  };
  return (
    <div className="flex flex-wrap items-center gap-3">
      <Button variant="secondary" onClick={run} disabled={busy} data-testid="verify-ledger">{busy ? 'Checking…' : 'Verify chain'}</Button>
      {state && 'error' in state && <span role="alert" className="font-bold text-warning">{state.error}</span>}
      {state && 'ok' in state && (
        <span role="status" data-testid="verify-result" className={`font-bold ${state.ok ? 'text-susceptible' : 'text-warning'}`}>
          {state.ok
            ? `Chain intact: ${state.rows.toLocaleString()} rows, each linked to the one before.`
            : `Chain broken at row ${state.firstBadId}: that row (or the one before it) was changed or removed outside the application.`}
        </span>
      )}
    </div>
  );
}
