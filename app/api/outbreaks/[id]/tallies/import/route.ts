import { route } from '@/lib/http/handler';
import { AppError } from '@/lib/http/errors';
import { importTalliesCsv } from '@/lib/db/tallies';
import { CSV_MAX_BYTES } from '@/lib/tallies/csv';
import { importQuerySchema } from '@/lib/tallies/query';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

const CSV_TYPES = new Set(['text/csv', 'text/plain', 'application/csv', 'application/vnd.ms-excel']);
const tooLarge = () => new AppError('payload_too_large', `The file is larger than ${CSV_MAX_BYTES / 1024 / 1024} MB. Split it into smaller files.`);

/**
 * The CSV body, read here rather than by route() (which reads JSON): a CSV content type (415),
 * at most 5 MB however the length is declared (413), decoded as UTF-8.
 */
async function readCsv(req: Request): Promise<string> {
  const type = (req.headers.get('content-type') ?? '').split(';')[0]!.trim().toLowerCase();
  if (!CSV_TYPES.has(type)) throw new AppError('unsupported_media_type', 'Send the file as CSV (Content-Type: text/csv).');
  if (Number(req.headers.get('content-length') ?? '0') > CSV_MAX_BYTES) throw tooLarge();
  if (!req.body) return '';
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > CSV_MAX_BYTES) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge();
    }
    chunks.push(value);
  }
  return new TextDecoder('utf-8').decode(Buffer.concat(chunks));
}

/**
 * `?mode=preview` (default): the row-by-row report, nothing written. `?mode=commit&expect=N`:
 * writes every valid row in one transaction, or nothing. Coordinators only (tally:import).
 */
export const POST = route({ query: importQuerySchema }, async ({ actor, params, query, req }) => {
  const text = await readCsv(req);
  return { report: await importTalliesCsv(actor, params.id!, text, { commit: query.mode === 'commit', expected: query.expect, today: query.today }) };
});
