'use client';
import Link from 'next/link';
import { useState } from 'react';
import type { ScenarioInput } from '@/lib/model';
import type { ScenarioRecord } from '@/lib/types/records';
import { removeScenario, saveScenario, useScenarios } from '@/lib/data/scenarios';
import { useScenarioEditor } from '@/lib/stores/scenario-editor';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { fmt } from './readings';

const describe = (s: ScenarioRecord) => {
  const i = s.input as Partial<ScenarioInput> | null;
  if (!i?.params) return '';
  const R0 = i.params.gamma ? i.params.beta! / i.params.gamma : NaN;
  const n = i.interventions?.length ?? 0;
  return `${i.model} · R0 ${fmt(R0, 2)} · ${i.days} days${n ? ` · ${n} intervention${n > 1 ? 's' : ''}` : ''}`;
};

/** Save the draft for the outbreak, load or delete saved scenarios, and go to the comparison. */
export function SavedScenarios({ outbreakId, draft, valid }: { outbreakId: string | null; draft: ScenarioInput; valid: boolean }) {
  const { scenarios, loading, error } = useScenarios(outbreakId);
  const saved = useScenarioEditor((s) => s.saved);
  const setSaved = useScenarioEditor((s) => s.setSaved);
  const setDraft = useScenarioEditor((s) => s.setDraft);
  const [name, setName] = useState(saved?.name ?? '');
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  if (!outbreakId) return <p>Choose an outbreak to save scenarios for it.</p>;

  const doSave = async (asNew: boolean) => {
    setBusy(true);
    setMessage(null);
    try {
      const keep = !asNew && saved && scenarios.some((s) => s.id === saved.id);
      const rec = await saveScenario(
        outbreakId,
        { ...(keep ? { id: saved.id } : {}), name: name.trim() || 'Untitled scenario', input: draft, notes: { source: 'manual' } },
        keep ? saved.version : undefined,
      );
      setSaved({ id: rec.id, version: rec.version, name: rec.name });
      setName(rec.name);
      setMessage({ tone: 'success', text: `Saved “${rec.name}”.` });
    } catch (e) {
      setMessage({ tone: 'error', text: e instanceof Error ? e.message : 'Not saved.' });
    } finally {
      setBusy(false);
    }
  };

  return (
    <div className="flex flex-col gap-3" data-testid="saved-scenarios">
      <div className="flex flex-wrap items-end gap-2">
        <div className="min-w-56 flex-1">
          <TextField label="Scenario name" value={name} data-testid="scenario-name" maxLength={120} onChange={(e) => setName(e.target.value)}
            placeholder="e.g. Schools closed from day 21" />
        </div>
        <Button onClick={() => doSave(false)} disabled={!valid || busy} data-testid="scenario-save">
          {saved && scenarios.some((s) => s.id === saved.id) ? 'Save changes' : 'Save scenario'}
        </Button>
        {saved && <Button variant="secondary" onClick={() => doSave(true)} disabled={!valid || busy} data-testid="scenario-save-new">Save as new</Button>}
      </div>
      {message && <Notice tone={message.tone}>{message.text}</Notice>}
      {error && <Notice tone="error">Saved scenarios could not be loaded: {error.message}</Notice>}
      {loading && !scenarios.length ? <p>Loading saved scenarios…</p> : null}
      {scenarios.length > 0 && (
        <ul className="flex flex-col divide-y divide-line rounded-lg border border-line">
          {scenarios.map((s) => (
            <li key={s.id} className="flex flex-wrap items-center justify-between gap-2 p-2" data-testid="saved-scenario">
              <div>
                <p className="font-bold">
                  {s.name} {s.official && <span className="ml-1 rounded bg-accent px-1 text-sm text-white">official forecast</span>}
                  {saved?.id === s.id && <span className="ml-1 text-sm text-ink/70">(in the editor)</span>}
                </p>
                <p className="text-sm text-ink/80">{describe(s)} · saved {s.updatedAt.slice(0, 10)}</p>
              </div>
              <div className="flex gap-1">
                <Button variant="secondary" onClick={() => {
                  setDraft(s.input as ScenarioInput);
                  setSaved({ id: s.id, version: s.version, name: s.name });
                  setName(s.name);
                  setMessage(null);
                }}>Load</Button>
                <Button variant="quiet" onClick={async () => {
                  if (!window.confirm(`Delete “${s.name}”?`)) return;
                  try {
                    await removeScenario(s);
                    if (saved?.id === s.id) setSaved(null);
                  } catch (e) {
                    setMessage({ tone: 'error', text: e instanceof Error ? e.message : 'Not deleted.' });
                  }
                }}>Delete</Button>
              </div>
            </li>
          ))}
        </ul>
      )}
      {scenarios.length >= 2 && (
        <Link href={`/forecast?outbreak=${outbreakId}#compare`} className="font-bold text-accent">Compare saved scenarios side by side →</Link>
      )}
    </div>
  );
}
