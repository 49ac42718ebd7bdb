import type { SyncMeta } from '@/lib/types/records';
import type { SyncedRecord } from '@/models/synced';

/**
 * A stored instant as ISO 8601 UTC. SQLite keeps Sequelize's text form `YYYY-MM-DD HH:MM:SS.SSS +00:00`,
 * rewritten here without a Date (parsing that form is slow, and lists convert thousands of them);
 * anything else (a Date from PostgreSQL, another text form) goes through Date.
 */
export function iso(d: Date | string | null | undefined): string | null {
  if (d == null) return null;
  if (typeof d === 'string' && d.length === 30 && d.endsWith(' +00:00') && d[10] === ' ') return `${d.slice(0, 10)}T${d.slice(11, 23)}Z`;
  return new Date(d).toISOString();
}

/** The sync fields of a model instance as a plain object. */
export function syncMeta(m: SyncedRecord): SyncMeta {
  return {
    id: m.id,
    version: Number(m.version),
    changeSeq: Number(m.changeSeq),
    createdAt: iso(m.createdAt)!,
    updatedAt: iso(m.updatedAt)!,
    deletedAt: iso(m.deletedAt),
    updatedBy: m.updatedBy,
    deviceId: m.deviceId,
  };
}
