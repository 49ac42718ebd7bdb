import { AppError, validationError } from '@/lib/http/errors';
import { SHEET_MAX_BYTES, tallySheetMetaSchema, type TallySheetMeta } from '@/lib/validation/upload';

/** Room for the multipart boundaries and the small text fields around the file. */
const FORM_OVERHEAD = 64 * 1024;
const LIMIT = SHEET_MAX_BYTES + FORM_OVERHEAD;

const tooLarge = () =>
  new AppError('payload_too_large', 'The file is larger than 5 MB. Take the photo at a lower resolution or scan in greyscale.', {
    fields: { file: 'Larger than 5 MB.' },
  });

/**
 * Reads a sheet upload: `multipart/form-data` with the fields `clientId`, `siteId`, `date` and
 * `file` (route() reads JSON only). The body is read with a hard limit whatever length is
 * declared (413), then parsed; the file's type is checked later from its bytes, never from the
 * name or the declared type.
 */
export async function readSheetUpload(req: Request): Promise<{ meta: TallySheetMeta; name: string; bytes: Uint8Array }> {
  const contentType = req.headers.get('content-type') ?? '';
  if (contentType.split(';')[0]!.trim().toLowerCase() !== 'multipart/form-data') {
    throw new AppError('unsupported_media_type', 'Send the sheet as a form upload (Content-Type: multipart/form-data) with a "file" field.');
  }
  if (Number(req.headers.get('content-length') ?? '0') > LIMIT) throw tooLarge();
  const chunks: Uint8Array[] = [];
  let size = 0;
  if (req.body) {
    const reader = req.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.byteLength;
      if (size > LIMIT) {
        await reader.cancel().catch(() => undefined);
        throw tooLarge();
      }
      chunks.push(value);
    }
  }
  let form: FormData;
  try {
    form = await new Request('http://upload.invalid/', { method: 'POST', headers: { 'content-type': contentType }, body: Buffer.concat(chunks) }).formData();
  } catch {
    throw new AppError('bad_request', 'The form upload could not be read. Choose the file again and retry.');
  }
  const file = form.get('file');
  if (!file || typeof file === 'string') {
    throw new AppError('validation_failed', 'Choose a photo or scan of the tally sheet.', { fields: { file: 'Required.' } });
  }
  if (file.size > SHEET_MAX_BYTES) throw tooLarge();
  const text = (k: string) => {
    const v = form.get(k);
    return typeof v === 'string' ? v : undefined;
  };
  const parsed = tallySheetMetaSchema.safeParse({ clientId: text('clientId'), siteId: text('siteId'), date: text('date') });
  if (!parsed.success) throw validationError(parsed.error.issues);
  return { meta: parsed.data, name: file.name || 'tally-sheet', bytes: new Uint8Array(await file.arrayBuffer()) };
}
