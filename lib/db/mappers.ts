import type { SyncMeta } from '@/lib/types/records';
import type { SyncedRecord } from '@/models/synced';

const iso = (d: Date | string | null) => (d == null ? null : new Date(d).toISOString());

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
