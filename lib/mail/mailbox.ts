import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { notFound } from '@/lib/http/errors';
import { decodeWords, parseMail } from './mime';

/**
 * Reads what the local mail catcher (scripts/mail-catcher.mjs) kept: the index and the messages.
 * The catcher writes; the app only reads.
 */
export function catcherDir(): string {
  if (process.env.MAIL_CATCHER_DIR) return path.resolve(process.env.MAIL_CATCHER_DIR);
  return path.resolve(process.env.EBBCAST_DATA_DIR || 'data', 'mail');
}

export interface CaughtMailSummary {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  /** Bytes. */
  size: number;
}

export interface CaughtMail extends CaughtMailSummary {
  text: string | null;
  html: string | null;
  headers: Record<string, string>;
}

interface IndexEntry extends CaughtMailSummary {
  file: string;
}

const ID = /^[a-z0-9]+-[a-f0-9]{8}$/;

function readIndex(): IndexEntry[] {
  const file = path.join(catcherDir(), 'index.json');
  if (!existsSync(file)) return [];
  try {
    const list = JSON.parse(readFileSync(file, 'utf8')) as unknown;
    return Array.isArray(list) ? (list as IndexEntry[]).filter((e) => typeof e?.id === 'string' && ID.test(e.id)) : [];
  } catch {
    return [];
  }
}

/** Newest first. */
export function listCaughtMail({ limit = 200, to }: { limit?: number; to?: string } = {}): CaughtMailSummary[] {
  return readIndex()
    .filter((e) => !to || e.to.some((a) => a.toLowerCase() === to.toLowerCase()))
    .reverse()
    .slice(0, limit)
    .map(({ id, receivedAt, from, to: rcpt, subject, size }) => ({ id, receivedAt, from, to: rcpt, subject: decodeWords(subject), size }));
}

export function getCaughtMail(id: string): CaughtMail {
  if (!ID.test(id)) throw notFound('Message');
  const entry = readIndex().find((e) => e.id === id);
  if (!entry) throw notFound('Message');
  const file = path.join(catcherDir(), `${entry.id}.eml`);
  if (!existsSync(file)) throw notFound('Message');
  const parsed = parseMail(readFileSync(file));
  return {
    id: entry.id, receivedAt: entry.receivedAt, from: entry.from, to: entry.to, size: entry.size,
    subject: parsed.subject, text: parsed.text, html: parsed.html, headers: parsed.headers,
  };
}

/** Whether mail goes to the local catcher (true) or to a relay configured by the operator. */
export function usingCatcher(): boolean {
  const url = process.env.SMTP_URL ?? '';
  return !url || /^smtps?:\/\/(127\.0\.0\.1|localhost|\[::1\])(:\d+)?\/?$/.test(url) && Boolean(process.env.MAIL_CATCHER_DIR);
}
