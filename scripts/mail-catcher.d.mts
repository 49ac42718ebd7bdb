/** Types of scripts/mail-catcher.mjs for the TypeScript tests. */
export interface Catcher {
  host: string;
  port: number;
  dir: string;
  /** `smtp://host:port`, the value for SMTP_URL. */
  url: string;
  close(): Promise<void>;
}

export interface CaughtIndexEntry {
  id: string;
  file: string;
  receivedAt: string;
  from: string;
  to: string[];
  /** The raw header value (may hold RFC 2047 encoded words). */
  subject: string;
  /** Bytes. */
  size: number;
}

export function startCatcher(opts: { dir: string; port?: number; host?: string; quiet?: boolean }): Promise<Catcher>;
