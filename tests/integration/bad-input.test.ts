/**
 * The bad-input catalogue (issue 8): hostile and careless inputs across route bodies, query
 * strings, CSV rows, scenario parameters (POST /api/runs), sync batches and tally-sheet uploads.
 * Each one must answer a 4xx that names the field (a key of `error.fields`, or the message),
 * never a 500, and write nothing (row counts of every table before and after).
 * Expected statuses follow the API convention in DEVELOPERS.md [cp].
 */
import { call, prepare, sessionCookie, USING_POSTGRES } from '../helpers/server';
import { randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS } from '@/lib/db/demo';
import { countRows, diffCounts, multipart, PNG_BYTES, scenarioInput, type RawBody } from './route-matrix.fixtures';

import * as outbreaks from '@/app/api/outbreaks/route';
import * as outbreak1 from '@/app/api/outbreaks/[id]/route';
import * as sites from '@/app/api/outbreaks/[id]/sites/route';
import * as teams from '@/app/api/outbreaks/[id]/teams/route';
import * as users from '@/app/api/users/route';
import * as user from '@/app/api/users/[id]/route';
import * as scenarios from '@/app/api/outbreaks/[id]/scenarios/route';
import * as scenario from '@/app/api/scenarios/[id]/route';
import * as official from '@/app/api/scenarios/[id]/official/route';
import * as runs from '@/app/api/runs/route';
import * as tallies from '@/app/api/tallies/route';
import * as tally from '@/app/api/tallies/[id]/route';
import * as outbreakTallies from '@/app/api/outbreaks/[id]/tallies/route';
import * as tallyImport from '@/app/api/outbreaks/[id]/tallies/import/route';
import * as curve from '@/app/api/outbreaks/[id]/curve/route';
import * as grid from '@/app/api/outbreaks/[id]/tallies/grid/route';
import * as pull from '@/app/api/sync/pull/route';
import * as push from '@/app/api/sync/push/route';
import * as devices from '@/app/api/devices/route';
import * as conflicts from '@/app/api/conflicts/route';
import * as settle from '@/app/api/conflicts/[id]/settle/route';
import * as ledger from '@/app/api/ledger/route';
import * as mail from '@/app/api/mail/route';
import * as invitations from '@/app/api/invitations/route';
import * as reset from '@/app/api/auth/password-reset/route';
import * as resetConfirm from '@/app/api/auth/password-reset/confirm/route';
import * as invitation from '@/app/api/auth/invitation/route';
import * as uploads from '@/app/api/uploads/route';
import * as upload from '@/app/api/uploads/[id]/route';

type Who = 'anon' | 'field' | 'field2' | 'coordinator' | 'admin';
type Handler = (...a: never[]) => Promise<Response>;

interface BadCase {
  name: string;
  handler: Handler;
  url: string;
  method?: string;
  who: Who;
  params?: Record<string, string>;
  body?: unknown;
  raw?: { body: string | Uint8Array; contentType?: string };
  headers?: Record<string, string>;
  /** The status wanted (a 4xx). */
  status: number;
  /** A key of error.fields, or (when `inMessage`) words the message must contain. */
  field: string;
  inMessage?: boolean;
  /** Tables that may change (an audit row of a refused attempt); all others must not. */
  mayWrite?: RegExp;
  /** Extra check of the answer. */
  check?: (body: any) => void;
}

const O = DEMO_IDS.outbreak;
const cookies: Partial<Record<Who, string>> = {};
const TODAY = new Date().toISOString().slice(0, 10);
const future = new Date(Date.now() + 10 * 86_400_000).toISOString().slice(0, 10);
const MB = 'x'.repeat(1_000_000);
let fieldDevice = '';
let field2Device = '';
let tallyId = '';
let scenarioId = '';
let conflictId = '';

const outbreak = (over: Record<string, unknown> = {}) => ({ name: 'Bad input', disease: 'ILI', area: 'Somewhere', population: 1000, startDate: '2026-01-01', ...over });
const tallyBody = (over: Record<string, unknown> = {}) => ({ siteId: DEMO_IDS.alderCamp, date: TODAY, newCases: 1, ...over });
const runBody = (over: Record<string, unknown> = {}, ens?: unknown) => ({ input: { ...scenarioInput(), ...over }, ...(ens ? { ensemble: ens } : {}) });
const params = (p: Record<string, unknown>) => ({ ...scenarioInput(), params: { beta: 0.5, gamma: 0.25, ...p } });
const mutation = (over: Record<string, unknown> = {}) => ({
  mutationId: randomUUID(), seq: 1, entity: 'tally', entityId: randomUUID(), op: 'upsert', baseVersion: null,
  payload: { siteId: DEMO_IDS.alderCamp, date: TODAY, newCases: 1 }, recordedAt: new Date().toISOString(), ...over,
});
const csv = (rows: string) => ({ body: `site,date,newCases,note\r\n${rows}\r\n`, contentType: 'text/csv' });
/** A raw JSON text (for tokens JSON.stringify cannot make: NaN, __proto__ as an own key, 2^53+1 as written). */
const json = (text: string) => ({ body: text, contentType: 'application/json' });

function catalogue(): BadCase[] {
  const ob = { handler: outbreaks.POST as Handler, url: '/api/outbreaks', method: 'POST', who: 'coordinator' as Who };
  const tl = { handler: tallies.POST as Handler, url: '/api/tallies', method: 'POST', who: 'field' as Who };
  const rn = { handler: runs.POST as Handler, url: '/api/runs', method: 'POST', who: 'field' as Who };
  const sc = { handler: scenarios.POST as Handler, url: `/api/outbreaks/${O}/scenarios`, method: 'POST', who: 'field' as Who, params: { id: O } };
  const ps = { handler: push.POST as Handler, url: '/api/sync/push', method: 'POST', who: 'field' as Who };
  const imp = (q = 'mode=preview') => ({ handler: tallyImport.POST as Handler, url: `/api/outbreaks/${O}/tallies/import?${q}`, method: 'POST', who: 'coordinator' as Who, params: { id: O } });
  const list = (q: string) => ({ handler: outbreakTallies.GET as Handler, url: `/api/outbreaks/${O}/tallies?${q}`, who: 'field' as Who, params: { id: O } });
  const up = { handler: uploads.POST as Handler, url: '/api/uploads', method: 'POST', who: 'field' as Who };
  const csvIssue = (code: string, column: string | null) => (b: any) => {
    // A preview answers 200 with the row-by-row report: the bad row is named with its column and code.
    const issues = b.report.issues as Array<{ code: string; column: string | null; line: number }>;
    expect(issues.some((i) => i.code === code && i.column === column), JSON.stringify(issues)).toBe(true);
    expect(b.report.valid ?? b.report.validCount ?? 0).not.toBeGreaterThan(0);
  };
  return [
    // ---- route bodies: outbreaks ----
    { ...ob, name: 'population as a string', body: outbreak({ population: '1000' }), status: 400, field: 'population' },
    { ...ob, name: 'population 1e309 (Infinity once parsed)', raw: json('{"name":"A","disease":"B","area":"C","population":1e309,"startDate":"2026-01-01"}'), status: 400, field: 'population' },
    { ...ob, name: 'population NaN as a bare token', raw: json('{"name":"A","disease":"B","area":"C","population":NaN,"startDate":"2026-01-01"}'), status: 400, field: 'NaN', inMessage: true },
    { ...ob, name: 'population "NaN" as a string', body: outbreak({ population: 'NaN' }), status: 400, field: 'population' },
    { ...ob, name: 'population 2^53+1', raw: json('{"name":"A","disease":"B","area":"C","population":9007199254740993,"startDate":"2026-01-01"}'), status: 400, field: 'population' },
    { ...ob, name: 'negative population', body: outbreak({ population: -5 }), status: 400, field: 'population' },
    { ...ob, name: 'fractional population', body: outbreak({ population: 10.5 }), status: 400, field: 'population' },
    { ...ob, name: 'impossible date 2026-02-30', body: outbreak({ startDate: '2026-02-30' }), status: 400, field: 'startDate' },
    { ...ob, name: 'impossible month 2026-13-01', body: outbreak({ startDate: '2026-13-01' }), status: 400, field: 'startDate' },
    { ...ob, name: 'date as a timestamp number', body: outbreak({ startDate: 1767225600000 }), status: 400, field: 'startDate' },
    { ...ob, name: 'date with a time part', body: outbreak({ startDate: '2026-01-01T00:00:00Z' }), status: 400, field: 'startDate' },
    { ...ob, name: '1 MB name', body: outbreak({ name: MB }), status: 400, field: 'name' },
    { ...ob, name: 'NUL in the name', body: outbreak({ name: 'Camp\u0000A' }), status: 400, field: 'name' },
    { ...ob, name: 'right-to-left override in the name', body: outbreak({ name: 'Camp \u202eevil' }), status: 400, field: 'name' },
    { ...ob, name: 'blank name', body: outbreak({ name: '   ' }), status: 400, field: 'name' },
    { ...ob, name: '__proto__ key', raw: json('{"__proto__":{"role":"admin"},"name":"A","disease":"B","area":"C","population":10,"startDate":"2026-01-01"}'), status: 400, field: '__proto__' },
    { ...ob, name: 'constructor.prototype key', body: { ...outbreak(), constructor: { prototype: { admin: true } } }, status: 400, field: 'constructor' },
    { ...ob, name: 'unknown key', body: outbreak({ isOfficial: true }), status: 400, field: 'isOfficial' },
    { ...ob, name: 'body is an array', body: [outbreak()], status: 400, field: '(body)' },
    { ...ob, name: 'body is null', raw: json('null'), status: 400, field: '(body)' },
    { ...ob, name: 'truncated JSON', raw: json('{"name": "A", "disease'), status: 400, field: 'JSON', inMessage: true },
    { ...ob, name: 'empty body', raw: json(''), status: 400, field: 'JSON', inMessage: true },
    { ...ob, name: 'JSON sent as text/plain', raw: { body: JSON.stringify(outbreak()), contentType: 'text/plain' }, status: 415, field: 'Content-Type', inMessage: true },
    { ...ob, name: 'JSON sent as a form', raw: { body: 'name=A&population=10', contentType: 'application/x-www-form-urlencoded' }, status: 415, field: 'Content-Type', inMessage: true },
    { ...ob, name: 'no content type', raw: { body: JSON.stringify(outbreak()) }, status: 415, field: 'Content-Type', inMessage: true },
    { ...ob, name: 'body over 1 MiB', raw: json(JSON.stringify(outbreak({ name: 'x'.repeat(1_100_000) }))), status: 413, field: 'limit', inMessage: true },
    { ...ob, name: 'beds negative', body: outbreak({ beds: -1 }), status: 400, field: 'beds' },
    { ...ob, name: 'beds as a word', body: outbreak({ beds: 'many' }), status: 400, field: 'beds' },
    // ---- sites, teams, users, invitations ----
    { handler: sites.POST as Handler, url: `/api/outbreaks/${O}/sites`, method: 'POST', who: 'coordinator', params: { id: O }, name: 'unknown site kind', body: { name: 'S', kind: 'castle', population: 10 }, status: 400, field: 'kind' },
    { handler: sites.POST as Handler, url: `/api/outbreaks/${O}/sites`, method: 'POST', who: 'coordinator', params: { id: O }, name: 'teamId not a UUID', body: { name: 'S', kind: 'camp', population: 10, teamId: "1' OR '1'='1" }, status: 400, field: 'teamId' },
    { handler: sites.POST as Handler, url: `/api/outbreaks/${O}/sites`, method: 'POST', who: 'coordinator', params: { id: O }, name: "another outbreak's team", body: { name: 'S', kind: 'camp', population: 10, teamId: randomUUID() }, status: 400, field: 'teamId' },
    { handler: sites.POST as Handler, url: `/api/outbreaks/${O}/sites`, method: 'POST', who: 'coordinator', params: { id: O }, name: 'site population 0', body: { name: 'S', kind: 'camp', population: 0 }, status: 400, field: 'population' },
    { handler: teams.POST as Handler, url: `/api/outbreaks/${O}/teams`, method: 'POST', who: 'coordinator', params: { id: O }, name: 'team name of 121 characters', body: { name: 'T'.repeat(121) }, status: 400, field: 'name' },
    { handler: users.POST as Handler, url: '/api/users', method: 'POST', who: 'admin', name: 'not an e-mail address', body: { email: 'nobody', name: 'N', role: 'field' }, status: 400, field: 'email' },
    { handler: users.POST as Handler, url: '/api/users', method: 'POST', who: 'admin', name: 'unknown role', body: { email: 'r@x.example', name: 'N', role: 'superuser' }, status: 400, field: 'role' },
    { handler: users.POST as Handler, url: '/api/users', method: 'POST', who: 'admin', name: 'short password', body: { email: 'p@x.example', name: 'N', role: 'field', password: 'short' }, status: 400, field: 'password' },
    { handler: users.POST as Handler, url: '/api/users', method: 'POST', who: 'admin', name: '51 team ids', body: { email: 't@x.example', name: 'N', role: 'field', teamIds: Array.from({ length: 51 }, () => randomUUID()) }, status: 400, field: 'teamIds' },
    { handler: user.PATCH as Handler, url: '/api/users/x', method: 'PATCH', who: 'admin', params: { id: randomUUID() }, name: 'active as "yes"', body: { active: 'yes' }, status: 400, field: 'active' },
    { handler: user.PATCH as Handler, url: '/api/users/x', method: 'PATCH', who: 'admin', params: { id: randomUUID() }, name: 'unknown user id', body: { name: 'Z' }, status: 404, field: 'User', inMessage: true },
    { handler: user.PATCH as Handler, url: '/api/users/x', method: 'PATCH', who: 'admin', params: { id: "1; DROP TABLE users" }, name: 'user id with SQL in it', body: { name: 'Z' }, status: 404, field: 'found', inMessage: true },
    { handler: outbreak1.GET as Handler, url: '/api/outbreaks/x', who: 'admin', params: { id: 'not-a-uuid' }, name: 'outbreak id not a UUID (admin, no scope check first)', status: 404, field: 'found', inMessage: true },
    { handler: scenario.GET as Handler, url: '/api/scenarios/x', who: 'field', params: { id: '%27%3B--' }, name: 'scenario id with SQL in it', status: 404, field: 'found', inMessage: true },
    { handler: invitations.POST as Handler, url: '/api/invitations', method: 'POST', who: 'coordinator', name: 'field invitee without a team', body: { email: 'inv@x.example', name: 'I', role: 'field' }, status: 400, field: 'teamIds' },
    // ---- public forms ----
    { handler: reset.POST as Handler, url: '/api/auth/password-reset', method: 'POST', who: 'anon', name: 'reset for a non-address', body: { email: "' OR 1=1 --" }, status: 400, field: 'email', headers: { 'x-forwarded-for': '203.0.113.7' } },
    { handler: resetConfirm.POST as Handler, url: '/api/auth/password-reset/confirm', method: 'POST', who: 'anon', name: 'reset token cut short', body: { token: 'abc', password: 'a-long-enough-password' }, status: 400, field: 'token' },
    { handler: resetConfirm.POST as Handler, url: '/api/auth/password-reset/confirm', method: 'POST', who: 'anon', name: 'unknown reset token', body: { token: 'A'.repeat(43), password: 'a-long-enough-password' }, status: 400, field: 'reset link', inMessage: true },
    { handler: invitation.GET as Handler, url: '/api/auth/invitation?token=%00%00', who: 'anon', name: 'NUL in an invitation token query', status: 400, field: 'token' },
    { handler: invitation.POST as Handler, url: '/api/auth/invitation', method: 'POST', who: 'anon', name: 'invitation password too long', body: { token: 'B'.repeat(43), password: 'p'.repeat(201) }, status: 400, field: 'password' },
    // ---- tallies ----
    { ...tl, name: 'negative new cases', body: tallyBody({ newCases: -1 }), status: 400, field: 'newCases' },
    { ...tl, name: 'new cases 2^53+1', raw: json(`{"siteId":"${DEMO_IDS.alderCamp}","date":"${TODAY}","newCases":9007199254740993}`), status: 400, field: 'newCases' },
    { ...tl, name: 'new cases as "5"', body: tallyBody({ newCases: '5' }), status: 400, field: 'newCases' },
    { ...tl, name: 'new cases 1e309', raw: json(`{"siteId":"${DEMO_IDS.alderCamp}","date":"${TODAY}","newCases":1e309}`), status: 400, field: 'newCases' },
    { ...tl, name: 'new cases -0.5', body: tallyBody({ newCases: -0.5 }), status: 400, field: 'newCases' },
    { ...tl, name: 'recoveries negative', body: tallyBody({ recoveries: -3 }), status: 400, field: 'recoveries' },
    { ...tl, name: 'deaths as an object', body: tallyBody({ deaths: { $gt: 0 } }), status: 400, field: 'deaths' },
    { ...tl, name: '29 February of a common year', body: tallyBody({ date: '2027-02-29' }), status: 400, field: 'date' },
    { ...tl, name: 'date in the future', body: tallyBody({ date: future }), status: 400, field: 'date' },
    { ...tl, name: "date before the outbreak's day 0", body: tallyBody({ date: '2000-01-01' }), status: 400, field: 'date' },
    { ...tl, name: 'note of 281 characters', body: tallyBody({ note: 'n'.repeat(281) }), status: 400, field: 'note' },
    { ...tl, name: 'NUL in the note', body: tallyBody({ note: 'ok\u0000hidden' }), status: 400, field: 'note' },
    { ...tl, name: 'right-to-left isolate in the note', body: tallyBody({ note: 'see \u2067txt.exe\u2069' }), status: 400, field: 'note' },
    { ...tl, name: 'unknown site', body: tallyBody({ siteId: randomUUID() }), status: 404, field: 'Site', inMessage: true },
    { ...tl, name: "another team's site", body: tallyBody({ siteId: DEMO_IDS.lakeshoreWard }), status: 403, field: 'tally', inMessage: true },
    { ...tl, name: '__proto__ in a tally', raw: json(`{"siteId":"${DEMO_IDS.alderCamp}","date":"${TODAY}","newCases":1,"__proto__":{"version":99}}`), status: 400, field: '__proto__' },
    { handler: tally.PUT as Handler, url: '/api/tallies/x', method: 'PUT', who: 'field', params: { id: 'not-a-uuid' }, name: 'tally id not a UUID', body: tallyBody({ baseVersion: 1 }), status: 400, field: 'id' },
    { handler: tally.DELETE as Handler, url: '/api/tallies/x?baseVersion=abc', method: 'DELETE', who: 'field', params: { id: randomUUID() }, name: 'delete with baseVersion=abc', status: 400, field: 'baseVersion' },
    // ---- query strings ----
    { ...list('limit=abc'), name: 'limit=abc', status: 400, field: 'limit' },
    { ...list('limit=100000'), name: 'limit beyond 1000', status: 400, field: 'limit' },
    { ...list('offset=-1'), name: 'negative offset', status: 400, field: 'offset' },
    { ...list('sort=id;DROP%20TABLE%20tallies'), name: 'sort with SQL in it', status: 400, field: 'sort' },
    { ...list('from=2026-02-31'), name: 'from=2026-02-31', status: 400, field: 'from' },
    { ...list('site=%27%20OR%201%3D1'), name: 'site with SQL in it', status: 400, field: 'site' },
    { ...list('colour=red'), name: 'unknown query parameter', status: 400, field: 'colour' },
    { handler: pull.GET as Handler, url: '/api/sync/pull?cursor=-1', who: 'field', name: 'cursor=-1', status: 400, field: 'cursor' },
    { handler: pull.GET as Handler, url: '/api/sync/pull?cursor=1e309', who: 'field', name: 'cursor=1e309', status: 400, field: 'cursor' },
    { handler: pull.GET as Handler, url: '/api/sync/pull?limit=2001', who: 'field', name: 'pull limit 2001', status: 400, field: 'limit' },
    { handler: pull.GET as Handler, url: '/api/sync/pull?cursor=NaN', who: 'field', name: 'cursor=NaN', status: 400, field: 'cursor' },
    { handler: curve.GET as Handler, url: `/api/outbreaks/${O}/curve?today=2026-99-99`, who: 'field', params: { id: O }, name: 'curve today=2026-99-99', status: 400, field: 'today' },
    { handler: grid.GET as Handler, url: `/api/outbreaks/${O}/tallies/grid?from=yesterday`, who: 'field', params: { id: O }, name: 'grid from=yesterday', status: 400, field: 'from' },
    { handler: conflicts.GET as Handler, url: '/api/conflicts?outbreak=all', who: 'coordinator', name: 'conflicts outbreak=all', status: 400, field: 'outbreak' },
    { handler: conflicts.GET as Handler, url: `/api/conflicts?outbreak=${O}&status=deleted`, who: 'coordinator', name: 'conflicts status=deleted', status: 400, field: 'status' },
    { handler: ledger.GET as Handler, url: '/api/ledger?limit=0', who: 'coordinator', name: 'ledger limit=0', status: 400, field: 'limit' },
    { handler: ledger.GET as Handler, url: '/api/ledger?from=2026-1-1', who: 'coordinator', name: 'ledger from=2026-1-1', status: 400, field: 'from' },
    { handler: mail.GET as Handler, url: '/api/mail?to=%3Cscript%3E', who: 'admin', name: 'mail to=<script>', status: 400, field: 'to' },
    // ---- scenarios ----
    { ...sc, name: 'scenario beta negative', body: { name: 'S', input: params({ beta: -1 }) }, status: 400, field: 'input.params.beta' },
    { ...sc, name: 'scenario unknown model', body: { name: 'S', input: { ...scenarioInput(), model: 'XYZ' } }, status: 400, field: 'input.model' },
    { ...sc, name: 'scenario comment of 40 KiB', body: { name: 'S', input: scenarioInput(), notes: { source: 'manual', comment: 'c'.repeat(40_000) } }, status: 400, field: 'notes.comment' },
    { ...sc, name: 'scenario baseVersion 0', body: { name: 'S', input: scenarioInput(), baseVersion: 0 }, status: 400, field: 'baseVersion' },
    { ...sc, name: 'scenario official as "true"', body: { name: 'S', input: scenarioInput(), official: 'true' }, status: 400, field: 'official' },
    { handler: scenario.PUT as Handler, url: '/api/scenarios/x', method: 'PUT', who: 'field', params: { id: 'SCENARIO' }, name: 'stale scenario baseVersion', body: { name: 'S', input: scenarioInput(), baseVersion: 99 }, status: 409, field: 'version', inMessage: true },
    { handler: official.POST as Handler, url: '/api/scenarios/x/official', method: 'POST', who: 'coordinator', params: { id: 'SCENARIO' }, name: 'official as 1', body: { official: 1 }, status: 400, field: 'official' },
    // ---- scenario parameters of POST /api/runs ----
    { ...rn, name: 'beta "NaN"', body: runBody({ params: { beta: 'NaN', gamma: 0.25 } }), status: 400, field: 'input.params.beta' },
    { ...rn, name: 'gamma 0', body: runBody({ params: { beta: 0.5, gamma: 0 } }), status: 400, field: 'input.params.gamma' },
    { ...rn, name: 'beta 1e309', raw: json(`{"input":{"model":"SIR","population":1000,"initial":{"I":1},"params":{"beta":1e309,"gamma":0.2},"method":"rk4","step":0.5,"days":30}}`), status: 400, field: 'input.params.beta' },
    { ...rn, name: 'population negative', body: runBody({ population: -100 }), status: 400, field: 'input.population' },
    { ...rn, name: 'horizon of 100000 days', body: runBody({ days: 100000 }), status: 422, field: 'input.days' },
    { ...rn, name: 'step of 1e-9 day', body: runBody({ step: 1e-9 }), status: 422, field: 'input.step' },
    { ...rn, name: 'a million ensemble runs', body: runBody({}, { ranges: { 'params.beta': [0.4, 0.6] }, runs: 1_000_000 }), status: 422, field: 'ensemble.runs' },
    { ...rn, name: 'ensemble range with a word', body: runBody({}, { ranges: { 'params.beta': [0.4, 'x'] }, runs: 10 }), status: 400, field: 'ensemble.ranges.params.beta.1' },
    { ...rn, name: 'ensemble seed -1', body: runBody({}, { ranges: { 'params.beta': [0.4, 0.6] }, runs: 10, seed: -1 }), status: 400, field: 'ensemble.seed' },
    { ...rn, name: 'input is an array', body: { input: [] }, status: 400, field: 'input' },
    { ...rn, name: 'run body over 256 KiB', raw: json(JSON.stringify({ input: scenarioInput(), pad: 'p'.repeat(300_000) })), status: 413, field: 'limit', inMessage: true },
    // ---- sync batches ----
    { ...ps, name: "another user's device id", body: () => ({ deviceId: field2Device, mutations: [mutation()] }), status: 403, field: 'device', inMessage: true },
    { ...ps, name: 'unregistered device id', body: { deviceId: randomUUID(), mutations: [mutation()] }, status: 404, field: 'device', inMessage: true },
    { ...ps, name: 'seq gap', body: () => ({ deviceId: fieldDevice, mutations: [mutation({ seq: 7 })] }), status: 409, field: 'seq', inMessage: true },
    { ...ps, name: 'seqs not consecutive', body: () => ({ deviceId: fieldDevice, mutations: [mutation({ seq: 1 }), mutation({ seq: 3 })] }), status: 400, field: 'mutations.1.seq' },
    { ...ps, name: 'the same mutationId twice', body: () => { const m = mutation(); return { deviceId: fieldDevice, mutations: [m, { ...m, seq: 2 }] }; }, status: 400, field: 'mutations' },
    { ...ps, name: 'unknown op', body: () => ({ deviceId: fieldDevice, mutations: [mutation({ op: 'merge' })] }), status: 400, field: 'mutations.0.op' },
    { ...ps, name: 'recordedAt "yesterday"', body: () => ({ deviceId: fieldDevice, mutations: [mutation({ recordedAt: 'yesterday' })] }), status: 400, field: 'mutations.0.recordedAt' },
    { ...ps, name: '501 mutations', body: () => ({ deviceId: fieldDevice, mutations: Array.from({ length: 501 }, (_, i) => mutation({ seq: i + 1 })) }), status: 400, field: 'mutations' },
    { ...ps, name: 'entityId not a UUID', body: () => ({ deviceId: fieldDevice, mutations: [mutation({ entityId: '../../etc/passwd' })] }), status: 400, field: 'mutations.0.entityId' },
    { ...ps, name: 'baseVersion 0', body: () => ({ deviceId: fieldDevice, mutations: [mutation({ baseVersion: 0 })] }), status: 400, field: 'mutations.0.baseVersion' },
    { ...ps, name: 'seq 2^53+1', raw: json('{"deviceId":"DEVICE","mutations":[{"mutationId":"00000000-0000-4000-8000-000000000001","seq":9007199254740993,"entity":"tally","entityId":"00000000-0000-4000-8000-000000000002","op":"upsert","baseVersion":null,"payload":null,"recordedAt":"2026-01-01T00:00:00Z"}]}'), status: 400, field: 'mutations.0.seq' },
    { ...ps, name: 'push body over 4 MiB', raw: json(JSON.stringify({ deviceId: randomUUID(), mutations: [], pad: 'p'.repeat(4_300_000) })), status: 413, field: 'limit', inMessage: true },
    { handler: devices.POST as Handler, url: '/api/devices', method: 'POST', who: 'field', name: "registering another user's device id", body: () => ({ id: field2Device, label: 'Mine now' }), status: 403, field: 'device', inMessage: true },
    { handler: devices.POST as Handler, url: '/api/devices', method: 'POST', who: 'field', name: 'device label with a bidi override', body: { id: randomUUID(), label: 'Tab\u202elet' }, status: 400, field: 'label' },
    { handler: settle.POST as Handler, url: '/api/conflicts/x/settle', method: 'POST', who: 'coordinator', params: { id: 'CONFLICT' }, name: 'settlement reason too short', body: { settlement: 'keep_current', reason: 'x', conflictVersion: 1, currentVersion: 1 }, status: 400, field: 'reason' },
    { handler: settle.POST as Handler, url: '/api/conflicts/x/settle', method: 'POST', who: 'coordinator', params: { id: 'CONFLICT' }, name: 'corrected without the count', body: { settlement: 'corrected', reason: 'typed', conflictVersion: 1, currentVersion: 1 }, status: 400, field: 'corrected.newCases' },
    // ---- CSV rows (the preview's report names line, column and code; nothing is written) ----
    { ...imp(), name: 'CSV negative count', raw: csv(`Alder Camp,${TODAY},-4,`), status: 200, field: '', check: csvIssue('count_negative', 'newCases') },
    { ...imp(), name: 'CSV count as a word', raw: csv(`Alder Camp,${TODAY},many,`), status: 200, field: '', check: csvIssue('count_not_number', 'newCases') },
    { ...imp(), name: 'CSV count 1e309', raw: csv(`Alder Camp,${TODAY},1e309,`), status: 200, field: '', check: (b: any) => expect(b.report.issues.some((i: { column: string }) => i.column === 'newCases')).toBe(true) },
    { ...imp(), name: 'CSV impossible date', raw: csv('Alder Camp,2026-02-30,4,'), status: 200, field: '', check: csvIssue('date_invalid', 'date') },
    { ...imp(), name: 'CSV unknown site', raw: csv(`Nowhere Camp,${TODAY},4,`), status: 200, field: '', check: csvIssue('site_unknown', 'site') },
    { ...imp(), name: 'CSV NUL in a note', raw: csv(`Alder Camp,${TODAY},4,bad\u0000note`), status: 200, field: '', check: csvIssue('note_control_chars', 'note') },
    { ...imp(), name: 'CSV without the newCases column', raw: { body: `site,date\r\nAlder Camp,${TODAY}\r\n`, contentType: 'text/csv' }, status: 200, field: '', check: csvIssue('missing_column', 'newCases') },
    { ...imp('mode=commit'), name: 'CSV commit of only bad rows', raw: csv(`Alder Camp,${TODAY},-1,`), status: 200, field: '', mayWrite: /^ledger_entries /, check: csvIssue('count_negative', 'newCases') },
    { ...imp(), name: 'CSV sent as JSON', raw: json('[["site","date","newCases"]]'), status: 415, field: 'CSV', inMessage: true },
    { ...imp('mode=commit&expect=abc'), name: 'CSV commit expect=abc', raw: csv(`Alder Camp,${TODAY},4,`), status: 400, field: 'expect' },
    { ...imp(), name: 'CSV over 5 MB', raw: csv(`Alder Camp,${TODAY},4,${'n'.repeat(5_300_000)}`), status: 413, field: 'MB', inMessage: true },
    // ---- uploads ----
    { ...up, name: 'upload as JSON', body: { file: 'aGVsbG8=' }, status: 415, field: 'multipart', inMessage: true },
    { ...up, name: 'upload without a file', raw: 'MULTIPART:nofile' as never, status: 400, field: 'file' },
    { ...up, name: 'GIF named .png', raw: 'MULTIPART:gif' as never, status: 415, field: 'file' },
    { ...up, name: 'HTML named .jpg', raw: 'MULTIPART:html' as never, status: 415, field: 'file' },
    { ...up, name: 'upload date 2026-02-30', raw: 'MULTIPART:date' as never, status: 400, field: 'date' },
    { ...up, name: 'upload siteId not a UUID', raw: 'MULTIPART:site' as never, status: 400, field: 'siteId' },
    { ...up, name: 'upload over 5 MB', raw: 'MULTIPART:big' as never, status: 413, field: 'file' },
    { handler: upload.GET as Handler, url: '/api/uploads/x', who: 'field', params: { id: '../../../etc/passwd' }, name: 'sheet id with a path in it', status: 404, field: 'found', inMessage: true },
  ].map((c) => c as BadCase);
}

/** Multipart bodies are built per run (they are binary). */
async function multipartFor(kind: string): Promise<RawBody> {
  const meta = { clientId: randomUUID(), siteId: DEMO_IDS.alderCamp, date: TODAY };
  const gif = new TextEncoder().encode('GIF89a\u0001\u0000\u0001\u0000');
  switch (kind) {
    case 'nofile': return multipart(meta);
    case 'gif': return multipart(meta, { name: 'sheet.png', bytes: gif, type: 'image/png' });
    case 'html': return multipart(meta, { name: 'sheet.jpg', bytes: new TextEncoder().encode('<!doctype html><script>alert(1)</script>'), type: 'image/jpeg' });
    case 'date': return multipart({ ...meta, date: '2026-02-30' }, { name: 'sheet.png', bytes: PNG_BYTES, type: 'image/png' });
    case 'site': return multipart({ ...meta, siteId: "x' OR '1'='1" }, { name: 'sheet.png', bytes: PNG_BYTES, type: 'image/png' });
    case 'big': {
      const bytes = new Uint8Array(5 * 1024 * 1024 + 10);
      bytes.set(PNG_BYTES);
      return multipart(meta, { name: 'sheet.png', bytes, type: 'image/png' });
    }
    default: throw new Error(kind);
  }
}

beforeAll(async () => {
  await prepare();
  for (const w of ['field', 'field2', 'coordinator', 'admin'] as const) cookies[w] = await sessionCookie(`${w}@marrowbend.example`);
  const { registerDevice } = await import('@/lib/db/sync');
  const { loadActor } = await import('@/lib/db/users');
  const { User } = await import('@/models');
  const actor = async (email: string) => {
    const u = (await User.findOne({ where: { email } }))!;
    return (await loadActor(u.id, u.sessionVersion))!;
  };
  fieldDevice = (await registerDevice(await actor('field@marrowbend.example'), { id: randomUUID(), label: 'Bad-input tablet' })).id;
  field2Device = (await registerDevice(await actor('field2@marrowbend.example'), { id: randomUUID(), label: 'Lakeshore tablet' })).id;
  const coord = await actor('coordinator@marrowbend.example');
  const { upsertScenario } = await import('@/lib/db/scenarios');
  scenarioId = (await upsertScenario(coord, { id: randomUUID(), outbreakId: O, name: 'Bad-input base', input: scenarioInput() as never }, { deviceId: null })).id;
  const { upsertTally } = await import('@/lib/db/tallies');
  const { createSite } = await import('@/lib/db/outbreaks');
  const site = await createSite(coord, { outbreakId: O, teamId: DEMO_IDS.teamNorth, name: 'Bad-input site', kind: 'camp', population: 100 });
  tallyId = (await upsertTally(coord, { siteId: site.id, date: TODAY, newCases: 1 }, { deviceId: null })).tally!.id;
  const second = await upsertTally(coord, { siteId: site.id, date: TODAY, newCases: 2 }, { deviceId: null });
  conflictId = second.conflict!.id;
});

describe('bad-input catalogue', () => {
  it('answers each bad input with a 4xx naming the field, never a 500, and writes nothing', async () => {
    const cases = catalogue();
    const names = new Set(cases.map((c) => c.name));
    expect(names.size, 'catalogue entries have distinct names').toBe(cases.length);
    const failures: string[] = [];
    const byStatus: Record<number, number> = {};
    for (const c of cases) {
      const p = Object.fromEntries(Object.entries(c.params ?? {}).map(([k, v]) => [k, v === 'SCENARIO' ? scenarioId : v === 'CONFLICT' ? conflictId : v]));
      let raw = c.raw as { body: string | Uint8Array; contentType?: string } | string | undefined;
      if (typeof raw === 'string' && raw.startsWith('MULTIPART:')) raw = await multipartFor(raw.slice(10));
      if (raw && typeof raw === 'object' && typeof raw.body === 'string') raw = { ...raw, body: raw.body.replace('"DEVICE"', JSON.stringify(fieldDevice)) };
      const body = typeof c.body === 'function' ? (c.body as () => unknown)() : c.body;
      const before = await countRows();
      const res = await call(c.handler as never, c.url, {
        method: c.method ?? 'GET', params: p, cookie: c.who === 'anon' ? undefined : cookies[c.who], headers: c.headers,
        ...(raw && typeof raw === 'object' ? { rawBody: raw.body, contentType: raw.contentType } : { body }),
      });
      byStatus[res.status] = (byStatus[res.status] ?? 0) + 1;
      const where = `${c.name}: ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`;
      if (res.status !== c.status) failures.push(`${where} (wanted ${c.status})`);
      if (res.status >= 500) failures.push(`${where} (server error)`);
      if (c.status >= 400) {
        const err = res.body?.error as { code?: string; message?: string; fields?: Record<string, string> } | undefined;
        if (!err?.message) failures.push(`${where} (no error message)`);
        else if (c.inMessage ? !err.message.toLowerCase().includes(c.field.toLowerCase()) : !(err.fields && c.field in err.fields)) {
          failures.push(`${where} (does not name ${c.field})`);
        }
      } else {
        try {
          c.check?.(res.body);
        } catch (e) {
          failures.push(`${where} (${(e as Error).message.slice(0, 200)})`);
        }
      }
      const changed = diffCounts(before, await countRows()).filter((t) => !c.mayWrite?.test(t));
      if (changed.length) failures.push(`${c.name}: wrote ${changed.join(', ')}`);
    }
    console.log(`bad-input catalogue (${USING_POSTGRES ? 'PostgreSQL' : 'SQLite'}): ${cases.length} distinct inputs, answers ${JSON.stringify(byStatus)}, 0 expected server errors`);
    expect(failures).toEqual([]);
    expect(cases.length).toBeGreaterThanOrEqual(60);
  });

  it('stores SQL metacharacters and other odd text literally where the field is free text', async () => {
    const odd = [
      "Robert'); DROP TABLE tallies;--",
      '" OR ""="',
      '%_\\ wildcard; -- comment /* c */',
      '=HYPERLINK("http://evil.example")',
      'Zürich “quotes” 日本語 🦠',
    ];
    const { createSite } = await import('@/lib/db/outbreaks');
    const { loadActor } = await import('@/lib/db/users');
    const { User } = await import('@/models');
    const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
    const coord = (await loadActor(u.id, u.sessionVersion))!;
    for (const [i, text] of odd.entries()) {
      // A site name (a label) and a tally note keep the text exactly as sent.
      const site = await call(sites.POST as never, `/api/outbreaks/${O}/sites`, {
        method: 'POST', cookie: cookies.coordinator, params: { id: O }, body: { name: `${text} ${i}`, kind: 'camp', population: 10, teamId: DEMO_IDS.teamNorth },
      });
      expect(site.status, JSON.stringify(site.body)).toBe(200);
      expect(site.body.site.name).toBe(`${text} ${i}`);
      const s2 = await createSite(coord, { outbreakId: O, teamId: DEMO_IDS.teamNorth, name: `Literal ${i}`, kind: 'camp', population: 10 });
      const t = await call(tallies.POST as never, '/api/tallies', { method: 'POST', cookie: cookies.field, body: { siteId: s2.id, date: TODAY, newCases: 1, note: text } });
      expect(t.status, JSON.stringify(t.body)).toBe(200);
      const back = await call(tally.GET as never, `/api/tallies/${t.body.tally.id}`, { cookie: cookies.field, params: { id: t.body.tally.id } });
      expect(back.body.tally.note).toBe(text);
    }
    // The tables are all still there and hold what they held.
    const counts = await countRows();
    expect(counts.tallies).toBeGreaterThan(0);
    expect(counts.users).toBeGreaterThanOrEqual(5);
  });
});
