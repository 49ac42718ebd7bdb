/**
 * Seeds a scale database for the tally benchmarks: one outbreak, `sites` sites, `days` days of tallies
 * per site, written with multi-row INSERTs in chunks inside one transaction (the data functions
 * would take minutes for 200,000 rows; the point here is the reads and the import, not the seed).
 * Call only after DATABASE_URL points at a scratch file.
 */
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import type { Actor } from '../lib/auth/actor';
import { addDays, utcToday } from '../lib/tallies/dates';
import { mulberry32 } from '../lib/model/random';

export interface ScaleSeed {
  actor: Actor;
  outbreakId: string;
  siteIds: string[];
  siteNames: string[];
  rows: number;
  startDate: string;
}

const stamp = (d: Date) => d.toISOString().replace('T', ' ').replace('Z', ' +00:00');

/** An outbreak with sites (and no tallies), for imports. */
export async function seedOutbreak(actor: Actor, opts: { sites: number; startDate: string; name: string }): Promise<{ outbreakId: string; siteIds: string[]; siteNames: string[] }> {
  const { writeTx } = await import('../lib/db/connection');
  const { Outbreak, Site, Team } = await import('../models');
  const outbreakId = randomUUID();
  const teamIds = [randomUUID(), randomUUID()];
  const siteIds = Array.from({ length: opts.sites }, () => randomUUID());
  const siteNames = siteIds.map((_, i) => `${opts.name} site ${String(i + 1).padStart(3, '0')}`);
  await writeTx(async (t) => {
    const meta = (i: number) => ({ version: 1, changeSeq: i + 1, updatedBy: actor.id, deviceId: null });
    await Outbreak.create({ id: outbreakId, name: opts.name, disease: 'ILI', area: 'Bench', population: opts.sites * 1000, startDate: opts.startDate, beds: null, ...meta(0) }, { transaction: t });
    await Team.bulkCreate(teamIds.map((id, i) => ({ id, outbreakId, name: `Team ${i + 1}`, ...meta(i) })), { transaction: t });
    await Site.bulkCreate(siteIds.map((id, i) => ({ id, outbreakId, teamId: teamIds[i % 2], name: siteNames[i], kind: 'village', population: 1000 + (i % 7) * 250, ...meta(i) })), { transaction: t });
  });
  actor.outbreakIds.push(outbreakId);
  return { outbreakId, siteIds, siteNames };
}

export async function seedScale(opts: { sites: number; days: number }): Promise<ScaleSeed> {
  const { db, writeTx } = await import('../lib/db/connection');
  const sequelize = await db();
  const actor: Actor = { id: randomUUID(), email: 'bench@example.invalid', name: 'Bench', role: 'coordinator', teamIds: [], outbreakIds: [] };
  const startDate = addDays(utcToday(), -opts.days);
  const { outbreakId, siteIds, siteNames } = await seedOutbreak(actor, { sites: opts.sites, startDate, name: 'Scale' });
  const rng = mulberry32(20261202);
  const now = stamp(new Date());
  let seq = 1000;
  let rows = 0;
  await writeTx(async (t) => {
    const CHUNK = 1000;
    let values: string[] = [];
    const flush = async () => {
      if (!values.length) return;
      await sequelize.query(
        `INSERT INTO tallies (id, version, change_seq, created_at, updated_at, deleted_at, updated_by, device_id, outbreak_id, site_id, date, new_cases, recoveries, deaths, admissions, note, recorded_by, recorded_at) VALUES ${values.join(',')}`,
        { type: QueryTypes.INSERT, transaction: t },
      );
      values = [];
    };
    for (let d = 0; d < opts.days; d++) {
      const date = addDays(startDate, d);
      // A wave over the year: low, a peak near day 120, a tail.
      const level = 1 + 40 * Math.exp(-(((d - 120) / 35) ** 2));
      for (const siteId of siteIds) {
        // About 2 % of site-days unreported, as in the field.
        if (rng() < 0.02) continue;
        const n = Math.floor(level * (0.5 + rng()));
        values.push(`('${randomUUID()}',1,${++seq},'${now}','${now}',NULL,'${actor.id}',NULL,'${outbreakId}','${siteId}','${date}',${n},NULL,NULL,NULL,NULL,'${actor.id}','${now}')`);
        rows++;
        if (values.length >= CHUNK) await flush();
      }
    }
    await flush();
    await sequelize.query(`UPDATE server_counters SET value = ${seq} WHERE name = 'change'`, { transaction: t });
  });
  await sequelize.query('ANALYZE');
  return { actor, outbreakId, siteIds, siteNames, rows, startDate };
}
