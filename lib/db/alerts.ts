/**
 * The capacity alert (issue 7): when the outbreak's official forecast shows bed demand above the
 * beds within 14 days, its coordinators get one e-mail per forecast version, naming the day and
 * the range. The unique key (scenario id, version) in capacity_alerts makes "never twice" a
 * database guarantee, even when two checks run at once.
 *
 * A scenario's record version goes up on every save (a rename, an unchanged re-save, a withdraw and
 * a re-publish), so the version alone would alert again for a forecast the coordinators already
 * know. Each alert therefore also keeps a fingerprint of what the forecast is computed from, and a
 * version whose fingerprint was already alerted for the same scenario counts as already sent.
 */
import { createHash, randomUUID } from 'node:crypto';
import type { Transaction } from 'sequelize';
import { CapacityAlert, Outbreak, Scenario } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import { AppError, notFound } from '@/lib/http/errors';
import { addDays, daysBetween, utcToday } from '@/lib/tallies/dates';
import { capacityAlertMail } from '@/lib/mail/messages';
import { appUrl } from '@/lib/mail/links';
import { sendMail } from '@/lib/mail/transport';
import { db, writeTx } from './connection';
import { appendLedger, recordLedger } from './ledger';
import { officialForecast } from './sitrep';
import { listOutbreakMembers } from './users';

/** Days ahead the alert looks, from today. */
export const ALERT_WINDOW_DAYS = 14;

export type CapacityCheck =
  | { status: 'sent'; scenarioId: string; version: number; day: string; earliest: string | null; latest: string | null; recipients: string[] }
  | { status: 'already_sent'; scenarioId: string; version: number; day: string }
  | { status: 'within_capacity' | 'no_official_forecast' | 'no_bed_settings' | 'no_coordinators'; scenarioId?: string; version?: number };

function isUniqueViolation(err: unknown): boolean {
  return (err as { name?: string })?.name === 'SequelizeUniqueConstraintError';
}

/** JSON with sorted keys: the same forecast saved by another client (other key order) hashes the same. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v !== null && typeof v === 'object') {
    const o = v as Record<string, unknown>;
    return `{${Object.keys(o).sort().map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`).join(',')}}`;
  }
  return JSON.stringify(v) ?? 'null';
}

const parseJson = (s: string | null): unknown => {
  if (s == null) return null;
  try {
    return JSON.parse(s);
  } catch {
    return null;
  }
};

/**
 * What the alert is computed from: the scenario input, the fit intervals that draw the band
 * (notes.fit) and the beds. Null when the stored row is no longer the version that was checked
 * (saved again meanwhile): then only the version key applies, as before fingerprints.
 */
async function forecastFingerprint(scenarioId: string, version: number, beds: number): Promise<string | null> {
  const row = await Scenario.findByPk(scenarioId, { attributes: ['version', 'input', 'notes'] });
  if (!row || Number(row.version) !== version) return null;
  const notes = parseJson(row.notes) as { fit?: { R0Range?: unknown; infectiousPeriodRange?: unknown } } | null;
  const fit = notes?.fit ?? null;
  const basis = { input: parseJson(row.input), R0Range: fit?.R0Range ?? null, infectiousPeriodRange: fit?.infectiousPeriodRange ?? null, beds };
  return createHash('sha256').update(canonical(basis)).digest('hex');
}

/** An alert (sent or being sent) for the same scenario and the same forecast, whatever its version. */
async function alertedSameForecast(scenarioId: string, fingerprint: string, t: Transaction): Promise<CapacityAlert | null> {
  const rows = await CapacityAlert.findAll({ where: { scenarioId }, transaction: t });
  return rows.find((r) => (parseJson(r.detail) as { fingerprint?: unknown } | null)?.fingerprint === fingerprint) ?? null;
}

/**
 * Checks the official forecast and sends the alert when due. Safe to call as often as wanted
 * (on publishing, on a schedule, from the sitrep): a forecast version alerts at most once.
 */
export async function checkCapacityAlert(outbreakId: string, opts: { now?: Date } = {}): Promise<CapacityCheck> {
  await db();
  const outbreak = await Outbreak.findByPk(outbreakId);
  if (!outbreak || outbreak.deletedAt) throw notFound('Outbreak');
  const f = await officialForecast(outbreakId);
  if (!f || f.source !== 'official' || !f.scenarioId || f.scenarioVersion === null) return { status: 'no_official_forecast' };
  const ids = { scenarioId: f.scenarioId, version: f.scenarioVersion };
  if (!f.bedDemand || f.beds === null) return { status: 'no_bed_settings', ...ids };

  const today = utcToday(opts.now ?? new Date());
  const last = addDays(today, ALERT_WINDOW_DAYS);
  const central = f.dates.findIndex((d, i) => d >= today && d <= last && f.bedDemand!.p50[i]! > f.beds!);
  if (central < 0) return { status: 'within_capacity', ...ids };
  const day = f.dates[central]!;
  const crossing = (series: number[]) => {
    const i = series.findIndex((v, k) => f.dates[k]! >= today && v > f.beds!);
    return i < 0 ? null : f.dates[i]!;
  };
  const earliest = f.banded ? crossing(f.bedDemand.p95) : day;
  const latest = f.banded ? crossing(f.bedDemand.p5) : day;
  const peak = Math.max(...f.bedDemand.p50);
  const peakRange: [number, number] | null = f.banded ? [Math.max(...f.bedDemand.p5), Math.max(...f.bedDemand.p95)] : null;

  const existing = await CapacityAlert.findOne({ where: { scenarioId: ids.scenarioId, scenarioVersion: ids.version } });
  if (existing) return { status: 'already_sent', ...ids, day: existing.firstDay };
  const coordinators = await listOutbreakMembers(outbreakId, 'coordinator');
  if (!coordinators.length) return { status: 'no_coordinators', ...ids };
  const fingerprint = await forecastFingerprint(ids.scenarioId, ids.version, f.beds);

  // Claim the alert first: the unique key lets exactly one concurrent check of a version through;
  // the fingerprint look-up sits in the same write transaction (serialised on SQLite) for other versions.
  const alertId = randomUUID();
  let alreadyDay: string | null;
  try {
    alreadyDay = await writeTx(async (t): Promise<string | null> => {
      if (fingerprint) {
        const same = await alertedSameForecast(ids.scenarioId, fingerprint, t);
        if (same) return same.firstDay;
      }
      await CapacityAlert.create(
        {
          id: alertId, outbreakId, scenarioId: ids.scenarioId, scenarioVersion: ids.version, firstDay: day, recipients: 0,
          detail: JSON.stringify({ earliest, latest, beds: f.beds, peak, peakRange, checkedOn: today, status: 'sending', fingerprint }),
        },
        { transaction: t },
      );
      return null;
    });
  } catch (err) {
    if (isUniqueViolation(err)) return { status: 'already_sent', ...ids, day };
    throw err;
  }
  if (alreadyDay !== null) return { status: 'already_sent', ...ids, day: alreadyDay };

  const link = appUrl(`/sitrep?outbreak=${encodeURIComponent(outbreakId)}`);
  const sent: string[] = [];
  for (const c of coordinators) {
    try {
      await sendMail(capacityAlertMail({
        to: c.email, recipientName: c.name, outbreakName: outbreak.name, forecastName: f.name, forecastVersion: ids.version, beds: f.beds,
        day, earliest, latest, inDays: daysBetween(today, day), peakBeds: peak, peakBedsRange: peakRange, link,
      }));
      sent.push(c.email);
    } catch {
      /* counted below */
    }
  }
  if (!sent.length) {
    // Nothing went out: release the claim so the next check tries again, and say so in the ledger.
    await CapacityAlert.destroy({ where: { id: alertId } });
    await recordLedger({ kind: 'capacity_alert_failed', outbreakId, detail: { ...ids, day } });
    throw new AppError('unavailable', 'The capacity alert could not be sent; it will be tried again.');
  }
  await writeTx(async (t) => {
    await CapacityAlert.update(
      { recipients: sent.length, detail: JSON.stringify({ earliest, latest, beds: f.beds, peak, peakRange, checkedOn: today, status: 'sent', to: sent, fingerprint }) },
      { where: { id: alertId }, transaction: t },
    );
    await appendLedger(t, {
      kind: 'capacity_alert', outbreakId, counts: { recipients: sent.length },
      detail: { scenarioId: ids.scenarioId, version: ids.version, day, earliest, latest, beds: f.beds, recipients: sent },
    });
  });
  return { status: 'sent', ...ids, day, earliest, latest, recipients: sent };
}

/** The route's entry: coordinators who may publish forecasts for the outbreak may run the check. */
export async function runCapacityCheck(actor: Actor, outbreakId: string): Promise<CapacityCheck> {
  authorize(actor, 'forecast:publish', { outbreakId });
  return checkCapacityAlert(outbreakId);
}

/** Alerts sent for an outbreak, newest first. */
export async function listCapacityAlerts(actor: Actor, outbreakId: string) {
  authorize(actor, 'sitrep:read', { outbreakId });
  await db();
  const rows = await CapacityAlert.findAll({ where: { outbreakId }, order: [['createdAt', 'DESC']] });
  return rows.map((r) => ({ id: r.id, scenarioId: r.scenarioId, version: r.scenarioVersion, firstDay: r.firstDay, recipients: r.recipients, sentAt: new Date(r.createdAt).toISOString(), detail: JSON.parse(r.detail) as Record<string, unknown> }));
}
