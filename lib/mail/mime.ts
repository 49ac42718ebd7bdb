/**
 * A small reader of the MIME messages the catcher keeps (RFC 5322 headers, RFC 2045 bodies,
 * RFC 2046 multiparts, RFC 2047 encoded words): enough to show our own messages on /mail and to
 * check them in tests. No mail parser is installed, and ours need only text and HTML parts.
 */

export interface ParsedMail {
  /** Header names in lower case → decoded values (the first occurrence of each). */
  headers: Record<string, string>;
  subject: string;
  from: string;
  to: string;
  date: string | null;
  text: string | null;
  html: string | null;
}

interface Part {
  headers: Record<string, string>;
  body: Buffer;
}

function decoderFor(charset: string | undefined): TextDecoder {
  const cs = (charset ?? 'utf-8').toLowerCase();
  try {
    return new TextDecoder(cs === 'us-ascii' ? 'utf-8' : cs);
  } catch {
    return new TextDecoder('utf-8');
  }
}

/** Quoted-printable (RFC 2045 §6.7) to bytes. */
export function decodeQuotedPrintable(s: string): Buffer {
  const text = s.replace(/=\r?\n/g, '');
  const bytes: number[] = [];
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (c === '=' && /^[0-9A-Fa-f]{2}$/.test(text.slice(i + 1, i + 3))) {
      bytes.push(parseInt(text.slice(i + 1, i + 3), 16));
      i += 2;
    } else {
      const code = c.charCodeAt(0);
      if (code < 0x80) bytes.push(code);
      else bytes.push(...Buffer.from(c, 'utf8'));
    }
  }
  return Buffer.from(bytes);
}

/** Encoded words (RFC 2047): `=?charset?Q|B?text?=`; spaces between adjacent words are dropped (§6.2). */
export function decodeWords(value: string): string {
  const joined = value.replace(/(=\?[^?]+\?[QqBb]\?[^?]*\?=)\s+(?==\?[^?]+\?[QqBb]\?[^?]*\?=)/g, '$1');
  return joined.replace(/=\?([^?]+)\?([QqBb])\?([^?]*)\?=/g, (_, charset: string, enc: string, text: string) => {
    const bytes = enc.toUpperCase() === 'B' ? Buffer.from(text, 'base64') : decodeQuotedPrintable(text.replace(/_/g, ' '));
    return decoderFor(charset.split('*')[0]).decode(bytes);
  });
}

function splitHead(buf: Buffer): { head: string; body: Buffer } {
  const s = buf.toString('latin1');
  const m = /\r?\n\r?\n/.exec(s);
  if (!m) return { head: s, body: Buffer.alloc(0) };
  return { head: s.slice(0, m.index), body: buf.subarray(m.index + m[0].length) };
}

function parseHeaders(head: string): Record<string, string> {
  const out: Record<string, string> = {};
  // Header bytes are 8-bit in practice (SMTPUTF8); read them as UTF-8.
  const text = Buffer.from(head, 'latin1').toString('utf8');
  for (const line of text.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const i = line.indexOf(':');
    if (i <= 0) continue;
    const name = line.slice(0, i).trim().toLowerCase();
    if (!(name in out)) out[name] = line.slice(i + 1).trim();
  }
  return out;
}

/** `type/subtype; a=b; c="d"` → the type and its parameters (lower-case names). */
export function parseContentType(value: string | undefined): { type: string; params: Record<string, string> } {
  const [type = 'text/plain', ...rest] = (value ?? 'text/plain').split(';');
  const params: Record<string, string> = {};
  for (const p of rest) {
    const i = p.indexOf('=');
    if (i < 0) continue;
    params[p.slice(0, i).trim().toLowerCase()] = p.slice(i + 1).trim().replace(/^"(.*)"$/, '$1');
  }
  return { type: type.trim().toLowerCase(), params };
}

function decodeBody(part: Part): Buffer {
  const enc = (part.headers['content-transfer-encoding'] ?? '7bit').toLowerCase();
  if (enc === 'base64') return Buffer.from(part.body.toString('latin1').replace(/\s+/g, ''), 'base64');
  if (enc === 'quoted-printable') return decodeQuotedPrintable(part.body.toString('latin1'));
  return part.body;
}

function leaves(part: Part, depth = 0): Part[] {
  const ct = parseContentType(part.headers['content-type']);
  if (!ct.type.startsWith('multipart/') || !ct.params.boundary || depth > 8) return [part];
  const text = part.body.toString('latin1');
  const delimiter = `--${ct.params.boundary}`;
  const pieces = text.split(new RegExp(`\\r?\\n?${delimiter.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}`));
  const out: Part[] = [];
  // pieces[0] is the preamble; a piece starting with "--" is the closing delimiter (epilogue after it).
  for (const piece of pieces.slice(1)) {
    if (piece.startsWith('--')) break;
    const buf = Buffer.from(piece.replace(/^[ \t]*\r?\n/, ''), 'latin1');
    const { head, body } = splitHead(buf);
    out.push(...leaves({ headers: parseHeaders(head), body }, depth + 1));
  }
  return out;
}

/** Parses a raw message into its decoded headers and its first text and HTML parts. */
export function parseMail(raw: Buffer | string): ParsedMail {
  const buf = typeof raw === 'string' ? Buffer.from(raw, 'utf8') : raw;
  const { head, body } = splitHead(buf);
  const rawHeaders = parseHeaders(head);
  const headers = Object.fromEntries(Object.entries(rawHeaders).map(([k, v]) => [k, decodeWords(v)]));
  let text: string | null = null;
  let html: string | null = null;
  for (const leaf of leaves({ headers: rawHeaders, body })) {
    const ct = parseContentType(leaf.headers['content-type']);
    if (/attachment/i.test(leaf.headers['content-disposition'] ?? '')) continue;
    const value = decoderFor(ct.params.charset).decode(decodeBody(leaf));
    if (ct.type === 'text/plain' && text === null) text = value.replace(/\r\n/g, '\n');
    if (ct.type === 'text/html' && html === null) html = value;
  }
  return {
    headers,
    subject: headers.subject ?? '',
    from: headers.from ?? '',
    to: headers.to ?? '',
    date: headers.date ?? null,
    text,
    html,
  };
}
