// Shared by the start and test scripts: the data folder and the session secret.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import path from 'node:path';

export const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..');
export const dataDir = path.resolve(root, process.env.EBBCAST_DATA_DIR || 'data');

/** NEXTAUTH_SECRET from the environment, else from data/nextauth-secret, made once (never committed). */
export function ensureSecret() {
  if (process.env.NEXTAUTH_SECRET) return process.env.NEXTAUTH_SECRET;
  mkdirSync(dataDir, { recursive: true });
  const file = path.join(dataDir, 'nextauth-secret');
  if (!existsSync(file)) writeFileSync(file, randomBytes(32).toString('base64url'), { mode: 0o600 });
  return readFileSync(file, 'utf8').trim();
}
