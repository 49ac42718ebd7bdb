'use client';
import { useRef, useState } from 'react';
import { importTalliesFile, type ImportReport } from '@/lib/data/tallies';
import { CSV_COLUMNS, CSV_MAX_BYTES } from '@/lib/tallies/csv';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';

/**
 * CSV import in two steps: the row-by-row report first (nothing written), then "import the valid
 * rows" (one transaction: all of them or none) or cancel.
 */
export function CsvImport({ outbreakId }: { outbreakId: string }) {
  const input = useRef<HTMLInputElement>(null);
  const [file, setFile] = useState<File | null>(null);
  const [report, setReport] = useState<ImportReport | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const reset = () => {
    setFile(null);
    setReport(null);
    if (input.current) input.current.value = '';
  };

  const choose = async (f: File | undefined) => {
    setError(null);
    setDone(null);
    setReport(null);
    if (!f) return;
    if (f.size > CSV_MAX_BYTES) {
      setError(`The file is ${(f.size / 1024 / 1024).toFixed(1)} MB; the limit is 5 MB. Split it into smaller files.`);
      return;
    }
    setFile(f);
    setBusy(true);
    try {
      setReport(await importTalliesFile(outbreakId, f, { commit: false }));
    } catch (err) {
      setError(err instanceof Error ? err.message : 'The file could not be checked.');
    } finally {
      setBusy(false);
    }
  };

  const commit = async () => {
    if (!file || !report) return;
    setBusy(true);
    setError(null);
    try {
      const r = await importTalliesFile(outbreakId, file, { commit: true, expected: report.validCount });
      setDone(`Imported ${r.imported ?? 0} tallies from ${file.name}.${r.issuesTotal ? ` ${r.badLines} line(s) with problems were left out.` : ''}`);
      reset();
    } catch (err) {
      setError(err instanceof Error ? err.message : 'Nothing was imported.');
    } finally {
      setBusy(false);
    }
  };

  return (
    <div className="flex flex-col gap-3">
      <p>
        Columns: <code>{CSV_COLUMNS.join(', ')}</code> with a header row; <code>site</code> is the site&apos;s name, dates as YYYY-MM-DD.
        Up to 5 MB and 100,000 rows. An export from this page reads back in.
      </p>
      <label className="flex flex-col gap-1 font-bold">
        CSV file
        <input ref={input} type="file" accept=".csv,text/csv" disabled={busy} onChange={(e) => void choose(e.target.files?.[0])}
          className="min-h-touch rounded-lg border-2 border-ink/30 bg-white p-2 font-normal" />
      </label>
      {busy && <p role="status">Checking…</p>}
      {error && <Notice tone="error">{error}</Notice>}
      {done && <Notice tone="success"><span data-testid="import-done">{done}</span></Notice>}
      {report && (
        <div className="flex flex-col gap-3" data-testid="import-report">
          <Notice tone={report.issuesTotal ? 'caution' : 'success'}>
            <p className="font-bold" data-testid="import-summary">
              {report.rows} row{report.rows === 1 ? '' : 's'}: {report.validCount} ready to import
              {report.unchangedCount ? `, ${report.unchangedCount} already recorded` : ''}
              {report.issuesTotal ? `, ${report.badLines || report.issuesTotal} with problems` : ', no problems'}.
            </p>
            {report.fatal && <p>The header is missing a required column, so no row can be read.</p>}
          </Notice>
          {report.issuesTotal > 0 && (
            <div className="max-h-96 overflow-auto">
              <table className="w-full border-collapse text-left" data-testid="import-issues">
                <caption className="text-left font-bold">Problems, line by line{report.issuesTotal > report.issues.length ? ` (first ${report.issues.length} of ${report.issuesTotal})` : ''}</caption>
                <thead><tr className="border-b-2 border-ink/40"><th className="px-2">Line</th><th className="px-2">Column</th><th className="px-2">Value</th><th className="px-2">Reason</th></tr></thead>
                <tbody>
                  {report.issues.map((i, k) => (
                    <tr key={k} className="border-b border-line">
                      <td className="num px-2">{i.line}</td>
                      <td className="px-2">{i.column ?? '—'}</td>
                      <td className="max-w-48 truncate px-2 font-mono text-sm">{i.value || '(empty)'}</td>
                      <td className="px-2">{i.reason}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
          {report.preview.length > 0 && (
            <details>
              <summary className="min-h-touch cursor-pointer font-bold">Preview of the rows to import</summary>
              <table className="w-full border-collapse text-left text-sm">
                <thead><tr><th className="px-2">Line</th><th className="px-2">Site</th><th className="px-2">Day</th><th className="px-2 text-right">New cases</th></tr></thead>
                <tbody>{report.preview.map((p) => (
                  <tr key={p.line} className="border-b border-line"><td className="num px-2">{p.line}</td><td className="px-2">{p.site}</td><td className="num px-2">{p.date}</td><td className="num px-2 text-right">{p.newCases}</td></tr>
                ))}</tbody>
              </table>
            </details>
          )}
          <div className="flex flex-wrap gap-2">
            <Button onClick={() => void commit()} disabled={busy || report.validCount === 0 || report.fatal}>
              Import {report.validCount} valid row{report.validCount === 1 ? '' : 's'}
            </Button>
            <Button variant="secondary" onClick={reset} disabled={busy}>Cancel: import nothing</Button>
          </div>
          {report.issuesTotal > 0 && report.validCount > 0 && <p className="text-sm">Rows with problems are left out; fix them in the file and import it again (rows already imported then show as already recorded).</p>}
        </div>
      )}
    </div>
  );
}
