import { Model } from 'sequelize';

/**
 * Base class of every synced model: declares the sync fields that `syncedFields` (./columns)
 * defines as columns, so each model declares only its own.
 */
export abstract class SyncedModel extends Model {
  declare id: string;
  declare version: number;
  declare changeSeq: number;
  declare createdAt: Date;
  declare updatedAt: Date;
  declare deletedAt: Date | null;
  declare updatedBy: string | null;
  declare deviceId: string | null;
}

/** The sync fields as a plain shape. */
export type SyncedRecord = Pick<SyncedModel, 'id' | 'version' | 'changeSeq' | 'createdAt' | 'updatedAt' | 'deletedAt' | 'updatedBy' | 'deviceId'>;
