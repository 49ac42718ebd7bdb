import { route } from '@/lib/http/handler';
import { readTallySheet } from '@/lib/db/uploads';
import { SHEET_TYPES } from '@/lib/validation/upload';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The sheet file itself, shown inline in the browser (image or PDF viewer). */
export const GET = route({}, async ({ actor, params }) => {
  const { sheet, bytes } = await readTallySheet(actor, params.id!);
  const name = `tally-sheet-${sheet.date}.${SHEET_TYPES[sheet.mimeType].ext}`;
  return new Response(new Uint8Array(bytes), {
    headers: {
      'content-type': sheet.mimeType,
      'content-length': String(bytes.byteLength),
      'content-disposition': `inline; filename="${name}"`,
      'cache-control': 'private, no-store',
      'x-content-type-options': 'nosniff',
    },
  });
});
