import { createHash, randomBytes, randomUUID } from 'node:crypto';
import { mkdirSync, renameSync, unlinkSync, writeFileSync, existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { Op } from 'sequelize';
import { Site, Tally, TallySheet, User } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import { AppError, notFound } from '@/lib/http/errors';
import { checkSheetFile, cleanFileName, SHEET_TYPES, type SheetType, type TallySheetMeta, type TallySheetQuery } from '@/lib/validation/upload';
import { daysBetween } from '@/lib/tallies/dates';
import { db, writeTx } from './connection';
import { appendLedger } from './ledger';
import { latestAcceptedDay } from './tallies';

/** A tally sheet as the API returns it (the file itself is at `url`). */
export interface TallySheetRecord {
  id: string;
  clientId: string;
  outbreakId: string;
  siteId: string;
  /** `YYYY-MM-DD`. */
  date: string;
  originalName: string;
  mimeType: SheetType;
  /** Bytes. */
  size: number;
  sha256: string;
  uploadedBy: string;
  uploadedByName: string | null;
  createdAt: string;
  url: string;
}

/** Where sheet files live: `<data folder>/uploads`, never served as static files. */
export function uploadsDir(): string {
  return path.resolve(process.env.EBBCAST_DATA_DIR || 'data', 'uploads');
}

const toRecord = (s: TallySheet, names: Map<string, string> = new Map()): TallySheetRecord => ({
  id: s.id, clientId: s.clientId, outbreakId: s.outbreakId, siteId: s.siteId, date: s.date, originalName: s.originalName,
  mimeType: s.mimeType as SheetType, size: Number(s.size), sha256: s.sha256, uploadedBy: s.uploadedBy,
  uploadedByName: names.get(s.uploadedBy) ?? null, createdAt: new Date(s.createdAt).toISOString(), url: `/api/uploads/${s.id}`,
});

async function liveSite(siteId: string): Promise<Site> {
  const site = await Site.findByPk(siteId);
  if (!site || site.deletedAt) throw new AppError('validation_failed', 'The site was not found.', { fields: { siteId: 'Unknown site.' } });
  return site;
}

/**
 * Stores a photo or scan of a paper tally sheet for a site and day. The checks run before
 * anything is written (size, type from the bytes, the name against the bytes, the day); the
 * file goes to a random name under the data folder and the row and its ledger entry commit
 * together, or the file is removed again. A retry with the same `clientId` returns the first copy.
 */
export async function saveTallySheet(
  actor: Actor,
  meta: TallySheetMeta,
  file: { name: string; bytes: Uint8Array },
): Promise<{ sheet: TallySheetRecord; duplicate: boolean }> {
  authorize(actor, 'upload:write');
  await db();
  const site = await liveSite(meta.siteId);
  authorize(actor, 'upload:write', { outbreakId: site.outbreakId, teamId: site.teamId });
  const check = checkSheetFile(file.name, file.bytes.byteLength, file.bytes.subarray(0, 512));
  if (!check.ok) throw new AppError(check.code, check.message, { fields: { file: check.message } });
  if (daysBetween(latestAcceptedDay(), meta.date) > 0) {
    throw new AppError('validation_failed', 'The day is in the future.', { fields: { date: 'The day is in the future.' } });
  }
  const sha256 = createHash('sha256').update(file.bytes).digest('hex');

  const previous = await TallySheet.findOne({ where: { clientId: meta.clientId } });
  if (previous) {
    if (previous.sha256 === sha256 && previous.siteId === meta.siteId && previous.date === meta.date) return { sheet: toRecord(previous), duplicate: true };
    throw new AppError('conflict', 'An upload with this id already exists with other contents.', { fields: { clientId: 'Already used.' } });
  }

  const dir = uploadsDir();
  mkdirSync(dir, { recursive: true });
  const storedName = `${randomBytes(16).toString('hex')}.${SHEET_TYPES[check.type].ext}`;
  const finalPath = path.join(dir, storedName);
  const tmpPath = `${finalPath}.part`;
  writeFileSync(tmpPath, file.bytes, { mode: 0o600 });
  try {
    renameSync(tmpPath, finalPath);
    const sheet = await writeTx(async (t) => {
      const row = await TallySheet.create(
        {
          id: randomUUID(), clientId: meta.clientId, outbreakId: site.outbreakId, siteId: site.id, date: meta.date, storedName,
          originalName: cleanFileName(file.name), mimeType: check.type, size: file.bytes.byteLength, sha256, uploadedBy: actor.id,
        },
        { transaction: t },
      );
      await appendLedger(t, {
        kind: 'upload',
        userId: actor.id,
        outbreakId: site.outbreakId,
        counts: { bytes: file.bytes.byteLength },
        detail: { sheetId: row.id, siteId: site.id, date: meta.date, type: check.type, sha256 },
      });
      return row;
    });
    return { sheet: toRecord(sheet, new Map([[actor.id, actor.name]])), duplicate: false };
  } catch (err) {
    for (const p of [tmpPath, finalPath]) if (existsSync(p)) unlinkSync(p);
    // Two tabs retrying the same offline upload: the unique clientId let only one in.
    if ((err as { name?: string }).name === 'SequelizeUniqueConstraintError') {
      const first = await TallySheet.findOne({ where: { clientId: meta.clientId } });
      if (first && first.sha256 === sha256) return { sheet: toRecord(first), duplicate: true };
    }
    throw err;
  }
}

/** Sheets of a site (and day), or of a whole outbreak, that the actor may read; newest first. */
export async function listTallySheets(actor: Actor, q: TallySheetQuery): Promise<TallySheetRecord[]> {
  authorize(actor, 'upload:read');
  await db();
  const where: Record<string, unknown> = {};
  if (q.siteId) {
    const site = await liveSite(q.siteId);
    authorize(actor, 'upload:read', { outbreakId: site.outbreakId, teamId: site.teamId });
    where.siteId = site.id;
  } else if (q.outbreakId) {
    authorize(actor, 'upload:read', { outbreakId: q.outbreakId });
    where.outbreakId = q.outbreakId;
    if (actor.role === 'field') {
      const sites = await Site.findAll({ where: { outbreakId: q.outbreakId, teamId: { [Op.in]: actor.teamIds } }, attributes: ['id'] });
      where.siteId = { [Op.in]: sites.map((s) => s.id) };
    }
  }
  if (q.date) where.date = q.date;
  const rows = await TallySheet.findAll({ where, order: [['date', 'DESC'], ['createdAt', 'DESC']], limit: 2000 });
  const users = await User.findAll({ where: { id: { [Op.in]: [...new Set(rows.map((r) => r.uploadedBy))] } }, attributes: ['id', 'name'] });
  const names = new Map(users.map((u) => [u.id, u.name]));
  return rows.map((r) => toRecord(r, names));
}

/** One sheet and its bytes, for viewing; 404 when missing or out of scope of the file store. */
export async function readTallySheet(actor: Actor, id: string): Promise<{ sheet: TallySheetRecord; bytes: Buffer }> {
  authorize(actor, 'upload:read');
  await db();
  const row = await TallySheet.findByPk(id);
  if (!row) throw notFound('Tally sheet');
  const site = await Site.findByPk(row.siteId);
  authorize(actor, 'upload:read', { outbreakId: row.outbreakId, teamId: site?.teamId ?? null });
  if (!/^[a-f0-9]{32}\.(jpg|png|pdf)$/.test(row.storedName)) throw notFound('Tally sheet');
  const file = path.join(uploadsDir(), row.storedName);
  if (!existsSync(file)) throw notFound('Tally sheet file');
  return { sheet: toRecord(row), bytes: readFileSync(file) };
}

/** Sheets of an outbreak with the live tally's new cases for the same site and day (null: no tally). */
export async function listTallySheetsWithCounts(actor: Actor, outbreakId: string): Promise<Array<TallySheetRecord & { newCases: number | null }>> {
  const sheets = await listTallySheets(actor, { outbreakId });
  if (!sheets.length) return [];
  const tallies = await Tally.findAll({
    where: { outbreakId, deletedAt: null, siteId: { [Op.in]: [...new Set(sheets.map((s) => s.siteId))] }, date: { [Op.in]: [...new Set(sheets.map((s) => s.date))] } },
    attributes: ['siteId', 'date', 'newCases'],
  });
  return sheets.map((s) => ({ ...s, newCases: tallies.find((t) => t.siteId === s.siteId && t.date === s.date)?.newCases ?? null }));
}
