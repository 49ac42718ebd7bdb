import { Outbreak, Team } from '@/models';
import { db } from './connection';

/** Every live team with its outbreak's name, for the admin's user form. */
export async function listAllTeams(): Promise<{ id: string; name: string; outbreakId: string; outbreakName: string }[]> {
  await db();
  const teams = await Team.findAll({ where: { deletedAt: null }, include: [{ model: Outbreak, attributes: ['name'] }], order: [['name', 'ASC']] });
  return teams.map((t) => ({
    id: t.id, name: t.name, outbreakId: t.outbreakId,
    outbreakName: (t as unknown as { Outbreak?: { name: string } }).Outbreak?.name ?? '',
  }));
}

export async function listAllOutbreakNames(): Promise<{ id: string; name: string }[]> {
  await db();
  return (await Outbreak.findAll({ where: { deletedAt: null }, attributes: ['id', 'name'], order: [['name', 'ASC']] })).map((o) => ({ id: o.id, name: o.name }));
}
