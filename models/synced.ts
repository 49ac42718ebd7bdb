/** The sync fields every synced model declares (see `syncedFields` in ./columns). */
export interface SyncedRecord {
  id: string;
  version: number;
  changeSeq: number;
  createdAt: Date;
  updatedAt: Date;
  deletedAt: Date | null;
  updatedBy: string | null;
  deviceId: string | null;
}
