import { randomUUID } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { Outbreak, OutbreakMember, Site, Team } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import type { OutbreakRecord, SiteRecord, TeamRecord } from '@/lib/types/records';
import type { OutbreakInput, SiteInput, TeamInput } from '@/lib/validation/outbreak';
import { AppError, notFound } from '@/lib/http/errors';
import { db, writeTx } from './connection';
import { nextChangeSeq } from './counters';
import { syncMeta } from './mappers';

export const toOutbreakRecord = (o: Outbreak): OutbreakRecord => ({
  ...syncMeta(o), name: o.name, disease: o.disease, area: o.area, population: o.population,
  startDate: String(o.startDate), beds: o.beds ?? null,
});
export const toTeamRecord = (t: Team): TeamRecord => ({ ...syncMeta(t), outbreakId: t.outbreakId, name: t.name });
export const toSiteRecord = (s: Site): SiteRecord => ({
  ...syncMeta(s), outbreakId: s.outbreakId, teamId: s.teamId, name: s.name, kind: s.kind, population: s.population,
});

/** Outbreaks the actor may read (admins: all). Tombstones excluded. */
export async function listOutbreaksForActor(actor: Actor): Promise<OutbreakRecord[]> {
  authorize(actor, 'outbreak:read');
  await db();
  const where = actor.role === 'admin' ? { deletedAt: null } : { deletedAt: null, id: { [Op.in]: actor.outbreakIds } };
  return (await Outbreak.findAll({ where, order: [['startDate', 'DESC']] })).map(toOutbreakRecord);
}

export async function getOutbreakById(actor: Actor, id: string): Promise<OutbreakRecord> {
  authorize(actor, 'outbreak:read', { outbreakId: id });
  await db();
  const o = await Outbreak.findByPk(id);
  if (!o || o.deletedAt) throw notFound('Outbreak');
  return toOutbreakRecord(o);
}

/** Sites of an outbreak the actor may see: field officers see their teams' sites only. */
export async function listSitesByOutbreak(actor: Actor, outbreakId: string): Promise<SiteRecord[]> {
  authorize(actor, 'outbreak:read', { outbreakId });
  await db();
  const where: Record<string | symbol, unknown> = { outbreakId, deletedAt: null };
  if (actor.role === 'field') where.teamId = { [Op.in]: actor.teamIds };
  return (await Site.findAll({ where, order: [['name', 'ASC']] })).map(toSiteRecord);
}

export async function listTeamsByOutbreak(actor: Actor, outbreakId: string): Promise<TeamRecord[]> {
  authorize(actor, 'outbreak:read', { outbreakId });
  await db();
  return (await Team.findAll({ where: { outbreakId, deletedAt: null }, order: [['name', 'ASC']] })).map(toTeamRecord);
}

/** The site and the scope it belongs to; 404 when missing or deleted. */
export async function getSiteById(actor: Actor, id: string): Promise<SiteRecord> {
  await db();
  const s = await Site.findByPk(id);
  if (!s || s.deletedAt) throw notFound('Site');
  authorize(actor, 'outbreak:read', { outbreakId: s.outbreakId, teamId: s.teamId });
  return toSiteRecord(s);
}

const stamp = async (actor: Actor, t: Transaction) => ({
  changeSeq: await nextChangeSeq(t),
  updatedBy: actor.id,
  deviceId: null,
});

export async function createOutbreak(actor: Actor, input: OutbreakInput): Promise<OutbreakRecord> {
  authorize(actor, 'outbreak:manage');
  const o = await writeTx(async (t) => {
    const created = await Outbreak.create({ ...input, beds: input.beds ?? null, id: input.id ?? randomUUID(), version: 1, ...(await stamp(actor, t)) }, { transaction: t });
    // The coordinator who opens an outbreak is responsible for it.
    await OutbreakMember.create({ id: randomUUID(), outbreakId: created.id, userId: actor.id }, { transaction: t });
    return created;
  });
  return toOutbreakRecord(o);
}

export async function createTeam(actor: Actor, input: TeamInput): Promise<TeamRecord> {
  authorize(actor, 'team:manage', { outbreakId: input.outbreakId });
  const team = await writeTx(async (t) => {
    if (!(await Outbreak.findByPk(input.outbreakId, { transaction: t }))) throw notFound('Outbreak');
    return Team.create({ ...input, id: input.id ?? randomUUID(), version: 1, ...(await stamp(actor, t)) }, { transaction: t });
  });
  return toTeamRecord(team);
}

export async function createSite(actor: Actor, input: SiteInput): Promise<SiteRecord> {
  authorize(actor, 'site:manage', { outbreakId: input.outbreakId });
  const site = await writeTx(async (t) => {
    if (!(await Outbreak.findByPk(input.outbreakId, { transaction: t }))) throw notFound('Outbreak');
    if (input.teamId) {
      const team = await Team.findByPk(input.teamId, { transaction: t });
      if (!team || team.outbreakId !== input.outbreakId) {
        throw new AppError('validation_failed', 'The team is not part of this outbreak.', { fields: { teamId: 'Not a team of this outbreak.' } });
      }
    }
    const dup = await Site.findOne({ where: { outbreakId: input.outbreakId, name: input.name, deletedAt: null }, transaction: t });
    if (dup) throw new AppError('conflict', 'A site with this name already exists in the outbreak.', { fields: { name: 'Already in use.' } });
    return Site.create({ ...input, teamId: input.teamId ?? null, id: input.id ?? randomUUID(), version: 1, ...(await stamp(actor, t)) }, { transaction: t });
  });
  return toSiteRecord(site);
}
