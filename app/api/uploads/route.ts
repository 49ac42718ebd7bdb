import { route } from '@/lib/http/handler';
import { listTallySheets, saveTallySheet } from '@/lib/db/uploads';
import { tallySheetQuerySchema } from '@/lib/validation/upload';
import { readSheetUpload } from './read-sheet';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Tally sheets of a site (`?siteId=`, optionally `&date=`) or an outbreak (`?outbreakId=`). */
export const GET = route({ query: tallySheetQuerySchema }, async ({ actor, query }) => ({ sheets: await listTallySheets(actor, query) }));

/** Attaches a photo or scan (JPEG, PNG or PDF, ≤ 5 MB) of a paper tally sheet to a site and day. */
export const POST = route({}, async ({ actor, req }) => {
  const upload = await readSheetUpload(req);
  return saveTallySheet(actor, upload.meta, { name: upload.name, bytes: upload.bytes });
});
