import { z } from 'zod';
import { isoDateSchema, uuidSchema } from './common';

/**
 * Tally-sheet uploads (issue 7): JPEG, PNG or PDF, at most 5 MB, the type read from the file's
 * first bytes. Shared by the upload form (checks before sending or queueing) and the server.
 */
export const SHEET_MAX_BYTES = 5 * 1024 * 1024;

export const SHEET_TYPES = {
  'image/jpeg': { ext: 'jpg', label: 'JPEG photo', names: ['jpg', 'jpeg', 'jpe', 'jfif'] },
  'image/png': { ext: 'png', label: 'PNG image', names: ['png'] },
  'application/pdf': { ext: 'pdf', label: 'PDF scan', names: ['pdf'] },
} as const;
export type SheetType = keyof typeof SHEET_TYPES;

const startsWith = (b: Uint8Array, sig: number[], at = 0) => sig.every((v, i) => b[at + i] === v);
const ascii = (b: Uint8Array, from: number, to: number) => String.fromCharCode(...b.subarray(from, to));

/**
 * The accepted type a file's first bytes show, or null. Signatures: JPEG SOI marker FF D8 FF
 * (ITU T.81 / JFIF), PNG's 8-byte signature (RFC 2083 §3.1 / ISO 15948), PDF's "%PDF-" header
 * (ISO 32000-1 §7.5.2).
 */
export function sniffSheetType(b: Uint8Array): SheetType | null {
  if (startsWith(b, [0xff, 0xd8, 0xff])) return 'image/jpeg';
  if (startsWith(b, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return 'image/png';
  if (startsWith(b, [0x25, 0x50, 0x44, 0x46, 0x2d])) return 'application/pdf';
  return null;
}

/** A plain name for a refused file's real contents, so the message can say what it is. */
export function describeOtherContents(b: Uint8Array): string {
  if (b.length === 0) return 'an empty file';
  if (ascii(b, 0, 6) === 'GIF87a' || ascii(b, 0, 6) === 'GIF89a') return 'a GIF image';
  if (ascii(b, 0, 4) === 'RIFF' && ascii(b, 8, 12) === 'WEBP') return 'a WebP image';
  if (ascii(b, 4, 8) === 'ftyp' && /^(heic|heix|hevc|heim|heis|mif1|msf1)$/.test(ascii(b, 8, 12))) return 'a HEIC photo';
  if (startsWith(b, [0x50, 0x4b, 0x03, 0x04])) return 'a ZIP archive or office document';
  if (startsWith(b, [0x4d, 0x5a])) return 'a program';
  if (startsWith(b, [0x49, 0x49, 0x2a, 0x00]) || startsWith(b, [0x4d, 0x4d, 0x00, 0x2a])) return 'a TIFF image';
  const head = ascii(b, 0, Math.min(b.length, 256)).trimStart().toLowerCase();
  if (head.startsWith('<!doctype html') || head.startsWith('<html') || head.startsWith('<svg') || head.startsWith('<?xml')) return 'a web page or SVG';
  if (b.subarray(0, Math.min(b.length, 512)).every((c) => c === 9 || c === 10 || c === 13 || (c >= 32 && c < 127))) return 'a text file';
  return 'an unknown kind of file';
}

/** The accepted type a file name claims by its extension; 'other' for any other extension, null for none. */
export function typeFromName(name: string): SheetType | 'other' | null {
  const m = /\.([A-Za-z0-9]{1,8})$/.exec(name.trim());
  if (!m) return null;
  const ext = m[1]!.toLowerCase();
  for (const [type, info] of Object.entries(SHEET_TYPES)) if ((info.names as readonly string[]).includes(ext)) return type as SheetType;
  return 'other';
}

export type SheetCheck =
  | { ok: true; type: SheetType }
  | { ok: false; code: 'payload_too_large' | 'unsupported_media_type'; message: string };

const mb = (n: number) => `${(n / 1024 / 1024).toFixed(1)} MB`;

/**
 * The one check of a sheet file: size, then the type from the bytes, then the name's extension
 * against the bytes (a PDF named .jpg, or a web page named .png, is refused with what it is).
 */
export function checkSheetFile(name: string, size: number, head: Uint8Array): SheetCheck {
  if (size > SHEET_MAX_BYTES) {
    return { ok: false, code: 'payload_too_large', message: `The file is ${mb(size)}; the limit is 5 MB. Take the photo at a lower resolution or scan in greyscale.` };
  }
  if (size === 0) return { ok: false, code: 'unsupported_media_type', message: 'The file is empty.' };
  const type = sniffSheetType(head);
  const claimed = typeFromName(name);
  if (!type) {
    const what = describeOtherContents(head);
    const hint = what === 'a HEIC photo' ? ' Set the camera to save JPEG ("most compatible") or export the photo as JPEG.' : '';
    const said = claimed && claimed !== 'other' ? ` although its name ends in .${name.split('.').pop()}` : '';
    return { ok: false, code: 'unsupported_media_type', message: `This file is ${what}${said}, not a JPEG, PNG or PDF.${hint}` };
  }
  if (claimed !== null && claimed !== type) {
    const ext = name.split('.').pop();
    return {
      ok: false,
      code: 'unsupported_media_type',
      message: `The file name ends in .${ext} but the file is a ${SHEET_TYPES[type].label}. Rename it to .${SHEET_TYPES[type].ext} or export it again.`,
    };
  }
  return { ok: true, type };
}

/** Bytes of a file needed to tell its type. */
export const SNIFF_BYTES = 512;

export const tallySheetMetaSchema = z.strictObject({
  /** Made on the device; a retried upload with the same id is stored once. */
  clientId: uuidSchema,
  siteId: uuidSchema,
  date: isoDateSchema,
});
export type TallySheetMeta = z.infer<typeof tallySheetMetaSchema>;

export const tallySheetQuerySchema = z
  .object({
    outbreakId: uuidSchema.optional(),
    siteId: uuidSchema.optional(),
    date: isoDateSchema.optional(),
  })
  .refine((q) => q.outbreakId || q.siteId, { message: 'Give an outbreak or a site.', path: ['siteId'] });
export type TallySheetQuery = z.infer<typeof tallySheetQuerySchema>;

/** A cleaned display name: no path, no control characters, at most 120 characters. */
export function cleanFileName(name: string): string {
  // eslint-disable-next-line no-control-regex
  const base = (name.split(/[\\/]/).pop() ?? '').replace(/[\u0000-\u001f\u007f\u202a-\u202e\u2066-\u2069"]/g, '').trim();
  return (base || 'tally-sheet').slice(-120);
}
