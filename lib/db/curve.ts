import { Op, QueryTypes } from 'sequelize';
import { Outbreak, Site } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import { notFound } from '@/lib/http/errors';
import { AVG_WINDOW, curveRange, cutoffOf, type EpiCurve, type EpiCurveDay } from '@/lib/tallies/curve';
import { db, dialect } from './connection';
import { acceptedToday } from './tallies';

interface Row {
  date: string;
  cases: number | string;
  reporting: number | string;
  avg7: number | string | null;
  cumulative: number | string;
  n: number | string;
}

/**
 * The epidemic curve of an outbreak (or one site), computed in the database: one GROUP BY over
 * the live tallies, a generated calendar so days without a tally appear (0 cases, unreported),
 * and window functions for the trailing 7-day mean and the running sum. Rows are days, never
 * tallies, so the cost does not grow with the number of sites beyond the one aggregate.
 *
 * Field officers get the curve of their teams' sites (they never see other teams' counts).
 * `today` is the client's calendar day when plausible (see acceptedToday).
 */
export async function getEpiCurve(actor: Actor, outbreakId: string, opts: { siteId?: string; today?: string | null } = {}): Promise<EpiCurve> {
  authorize(actor, 'tally:read', { outbreakId });
  const sequelize = await db();
  const outbreak = await Outbreak.findByPk(outbreakId);
  if (!outbreak || outbreak.deletedAt) throw notFound('Outbreak');
  let siteIds: string[] | null = null;
  if (opts.siteId) {
    const site = await Site.findByPk(opts.siteId);
    if (!site || site.deletedAt || site.outbreakId !== outbreakId) throw notFound('Site');
    authorize(actor, 'tally:read', { outbreakId, teamId: site.teamId });
    siteIds = [site.id];
  } else if (actor.role === 'field') {
    siteIds = (await Site.findAll({ where: { outbreakId, deletedAt: null, teamId: { [Op.in]: actor.teamIds } }, attributes: ['id'] })).map((s) => s.id);
  }
  const sitesInView = siteIds ? siteIds.length : await Site.count({ where: { outbreakId, deletedAt: null } });
  const today = acceptedToday(opts.today);
  const siteClause = siteIds ? (siteIds.length ? 'AND site_id IN (:siteIds)' : 'AND 0 = 1') : '';
  const replacements: Record<string, unknown> = { outbreakId, siteIds: siteIds ?? [] };

  const [last] = await sequelize.query<{ last: string | null }>(
    `SELECT MAX(date) AS last FROM tallies WHERE outbreak_id = :outbreakId AND deleted_at IS NULL ${siteClause}`,
    { type: QueryTypes.SELECT, replacements },
  );
  const { from, to } = curveRange(String(outbreak.startDate), last?.last ?? null, today);
  Object.assign(replacements, { from, to });

  // The calendar of the range: a recursive CTE on SQLite, generate_series on PostgreSQL.
  const calendar = dialect() === 'postgres'
    ? `SELECT to_char(g, 'YYYY-MM-DD') AS d FROM generate_series(CAST(:from AS date), CAST(:to AS date), interval '1 day') AS g`
    : `SELECT :from AS d UNION ALL SELECT date(d, '+1 day') FROM days WHERE d < :to`;
  const sql = `
    WITH RECURSIVE days(d) AS (${calendar}),
    agg AS (
      SELECT date, SUM(new_cases) AS cases, COUNT(*) AS reporting FROM tallies
      WHERE outbreak_id = :outbreakId AND deleted_at IS NULL ${siteClause} AND date BETWEEN :from AND :to
      GROUP BY date
    ),
    daily AS (SELECT days.d AS date, COALESCE(agg.cases, 0) AS cases, COALESCE(agg.reporting, 0) AS reporting FROM days LEFT JOIN agg ON agg.date = days.d)
    SELECT date, cases, reporting,
      AVG(cases * 1.0) OVER (ORDER BY date ROWS BETWEEN ${AVG_WINDOW - 1} PRECEDING AND CURRENT ROW) AS avg7,
      SUM(cases) OVER (ORDER BY date ROWS UNBOUNDED PRECEDING) AS cumulative,
      ROW_NUMBER() OVER (ORDER BY date) AS n
    FROM daily ORDER BY date`;
  const rows = await sequelize.query<Row>(sql, { type: QueryTypes.SELECT, replacements });
  const days: EpiCurveDay[] = rows.map((r) => {
    const reportingSites = Number(r.reporting);
    return {
      date: String(r.date), cases: Number(r.cases),
      // The window's mean only once it spans a full week; a shorter mean would read as a trend.
      avg7: Number(r.n) >= AVG_WINDOW && r.avg7 !== null ? Number(r.avg7) : null,
      cumulative: Number(r.cumulative), reportingSites, reported: reportingSites > 0,
    };
  });
  return { days, cutoff: cutoffOf(days, sitesInView, today), sitesInView, today, siteId: opts.siteId ?? null };
}
