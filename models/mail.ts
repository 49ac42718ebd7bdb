import { DataTypes, Model, type Sequelize } from 'sequelize';
import { attributes, ref, timestamps, type ColumnSpec } from './columns';

/**
 * A one-time link sent by e-mail: an invitation (sets the first password and activates the
 * account) or a password reset. Only a SHA-256 hash of the token is stored, so a copy of the
 * database does not hold usable links.
 */
export const mailTokenColumns: ColumnSpec = {
  id: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  /** 'invite' or 'reset'. */
  kind: { type: DataTypes.STRING(16), allowNull: false },
  /** Hex SHA-256 of the token in the link. */
  tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
  userId: ref('users', { onDelete: 'CASCADE' }),
  /** Who sent the invitation; null for a reset asked for by the person. */
  createdBy: { type: DataTypes.UUID, allowNull: true },
  expiresAt: { type: DataTypes.DATE, allowNull: false },
  /** Set when the link is used, or when a newer link of the same kind replaces it. */
  usedAt: { type: DataTypes.DATE, allowNull: true },
  ...timestamps,
};

export class MailToken extends Model {
  declare id: string;
  declare kind: 'invite' | 'reset';
  declare tokenHash: string;
  declare userId: string;
  declare createdBy: string | null;
  declare expiresAt: Date;
  declare usedAt: Date | null;
  declare createdAt: Date;
  declare updatedAt: Date;
}

/**
 * A capacity alert that was sent: one per official forecast version (the unique key), so the
 * same forecast never alerts twice.
 */
export const capacityAlertColumns: ColumnSpec = {
  id: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  outbreakId: ref('outbreaks'),
  /** The official scenario (forecast) and the version of it that was checked. */
  scenarioId: { type: DataTypes.UUID, allowNull: false },
  scenarioVersion: { type: DataTypes.INTEGER, allowNull: false },
  /** First calendar day (`YYYY-MM-DD`) on which the central bed demand exceeds the beds. */
  firstDay: { type: DataTypes.STRING(10), allowNull: false },
  /** JSON: the range of that day (earliest and latest crossing, peak demand band), beds, recipients. */
  detail: { type: DataTypes.TEXT, allowNull: false },
  /** People the alert was sent to. */
  recipients: { type: DataTypes.INTEGER, allowNull: false },
  ...timestamps,
};

export class CapacityAlert extends Model {
  declare id: string;
  declare outbreakId: string;
  declare scenarioId: string;
  declare scenarioVersion: number;
  declare firstDay: string;
  declare detail: string;
  declare recipients: number;
  declare createdAt: Date;
  declare updatedAt: Date;
}

/** A photo or scan of a paper tally sheet, attached to a site and a day. The file lives under the data folder. */
export const tallySheetColumns: ColumnSpec = {
  id: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  /** Made on the device: a retried offline upload is recognised and not stored twice. */
  clientId: { type: DataTypes.UUID, allowNull: false, unique: true },
  outbreakId: ref('outbreaks'),
  siteId: ref('sites'),
  /** Calendar day of the tally, `YYYY-MM-DD`. */
  date: { type: DataTypes.STRING(10), allowNull: false },
  /** Random file name under data/uploads (never the sender's name). */
  storedName: { type: DataTypes.STRING(64), allowNull: false },
  /** The sender's file name, cleaned, for display only. */
  originalName: { type: DataTypes.STRING(120), allowNull: false },
  /** The type found in the file's first bytes: image/jpeg, image/png or application/pdf. */
  mimeType: { type: DataTypes.STRING(32), allowNull: false },
  /** Bytes. */
  size: { type: DataTypes.INTEGER, allowNull: false },
  /** Hex SHA-256 of the contents. */
  sha256: { type: DataTypes.STRING(64), allowNull: false },
  uploadedBy: { type: DataTypes.UUID, allowNull: false },
  ...timestamps,
};

export class TallySheet extends Model {
  declare id: string;
  declare clientId: string;
  declare outbreakId: string;
  declare siteId: string;
  declare date: string;
  declare storedName: string;
  declare originalName: string;
  declare mimeType: string;
  declare size: number;
  declare sha256: string;
  declare uploadedBy: string;
  declare createdAt: Date;
  declare updatedAt: Date;
}

export function initMail(sequelize: Sequelize) {
  MailToken.init(attributes(mailTokenColumns), { sequelize, tableName: 'mail_tokens', modelName: 'MailToken', underscored: true });
  CapacityAlert.init(attributes(capacityAlertColumns), { sequelize, tableName: 'capacity_alerts', modelName: 'CapacityAlert', underscored: true });
  TallySheet.init(attributes(tallySheetColumns), { sequelize, tableName: 'tally_sheets', modelName: 'TallySheet', underscored: true });
}
