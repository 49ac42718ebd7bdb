/**
 * Plain records as the API returns them and the client stores them. Server data functions map
 * Sequelize instances to these at the boundary; no model instance ever leaves lib/db.
 */
import type { Role } from '@/lib/auth/roles';
import type { SiteKind } from '@/lib/validation/outbreak';

/** Sync fields of every synced record (SYNC.md). Dates are ISO strings. */
export interface SyncMeta {
  id: string;
  version: number;
  changeSeq: number;
  createdAt: string;
  updatedAt: string;
  deletedAt: string | null;
  updatedBy: string | null;
  deviceId: string | null;
}

export interface OutbreakRecord extends SyncMeta {
  name: string;
  disease: string;
  area: string;
  /** People. */
  population: number;
  /** Day 0, `YYYY-MM-DD`. */
  startDate: string;
  /** Beds available, people; null when unknown. */
  beds: number | null;
}

export interface TeamRecord extends SyncMeta {
  outbreakId: string;
  name: string;
}

export interface SiteRecord extends SyncMeta {
  outbreakId: string;
  teamId: string | null;
  name: string;
  kind: SiteKind;
  /** People at the site. */
  population: number;
}

export interface UserRecord {
  id: string;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  teamIds: string[];
  outbreakIds: string[];
  createdAt: string;
}

export interface TallyRecord extends SyncMeta {
  outbreakId: string;
  siteId: string;
  /** `YYYY-MM-DD`. */
  date: string;
  /** People, per day. */
  newCases: number;
  recoveries: number | null;
  deaths: number | null;
  admissions: number | null;
  note: string | null;
  recordedBy: string | null;
  recordedAt: string | null;
}

export interface ScenarioRecord extends SyncMeta {
  outbreakId: string;
  name: string;
  /** A ScenarioInput (lib/validation/scenario.ts). */
  input: unknown;
  official: boolean;
  notes: unknown;
}

export interface ConflictRecord {
  id: string;
  outbreakId: string;
  entity: string;
  entityId: string;
  reason: string;
  incoming: Record<string, unknown>;
  current: Record<string, unknown> | null;
  incomingVersion: number | null;
  currentVersion: number | null;
  deviceId: string | null;
  userId: string | null;
  recordedAt: string | null;
  status: 'open' | 'settled';
  settlement: string | null;
  settledBy: string | null;
  settledAt: string | null;
  settleReason: string | null;
  version: number;
  createdAt: string;
}
