/**
 * CSV in and out for tallies (papaparse). Pure: the server hands in the sites, the outbreak's
 * day 0, today and a lookup of existing tallies; nothing here touches a database or the DOM.
 *
 * Format: a header row, then one tally per row. Columns, in this order on export:
 *   site (the site's name), date (YYYY-MM-DD), newCases, recoveries, deaths, admissions, note
 * Header names are matched ignoring case, spaces and underscores ("New cases" = newCases).
 */
import Papa from 'papaparse';
import { tallyInputSchema, type TallyInput } from '@/lib/validation/tally';
import { normaliseValues, sameValues, type TallyValues } from '@/lib/sync/tally-rules';
import { isIsoDay } from './dates';

export const CSV_COLUMNS = ['site', 'date', 'newCases', 'recoveries', 'deaths', 'admissions', 'note'] as const;
export type CsvColumn = (typeof CSV_COLUMNS)[number];
const REQUIRED: CsvColumn[] = ['site', 'date', 'newCases'];
const COUNT_COLUMNS = ['newCases', 'recoveries', 'deaths', 'admissions'] as const;

/** Largest file accepted, bytes (5 MiB). */
export const CSV_MAX_BYTES = 5 * 1024 * 1024;
/** Most data rows accepted in one file. */
export const CSV_MAX_ROWS = 100_000;
/** Longest note, characters (as the tally schema). */
const NOTE_MAX = 280;
/** Largest count accepted, people (as the count schema). */
const COUNT_MAX = 1_000_000_000;

export type CsvIssueCode =
  | 'missing_column' | 'unknown_column' | 'duplicate_column' | 'empty_file'
  | 'field_count' | 'site_missing' | 'site_unknown'
  | 'date_missing' | 'date_format' | 'date_invalid' | 'date_future' | 'date_before_start'
  | 'count_missing' | 'count_not_number' | 'count_negative' | 'count_not_integer' | 'count_too_large'
  | 'note_too_long' | 'note_control_chars'
  | 'duplicate_in_file' | 'conflict_existing' | 'invalid';

export interface CsvIssue {
  /** Line of the file, 1 = the header. */
  line: number;
  /** The column the problem is in; null for a whole-row or whole-file problem. */
  column: CsvColumn | string | null;
  /** The cell as written (cut at 80 characters). */
  value: string;
  code: CsvIssueCode;
  /** A sentence a person can act on. */
  reason: string;
}

export interface CsvRow {
  line: number;
  cells: Partial<Record<CsvColumn, string>>;
}

export interface ParsedCsv {
  rows: CsvRow[];
  /** Problems with the file or the header, and rows with the wrong number of fields. */
  issues: CsvIssue[];
  /** True when a required column is missing: no row can be read. */
  fatal: boolean;
  /** Data rows in the file (including the ones refused for their shape). */
  rowCount: number;
}

const cut = (s: string) => (s.length > 80 ? `${s.slice(0, 77)}…` : s);
const key = (h: string) => h.replace(/^\uFEFF/, '').toLowerCase().replace(/[\s_-]+/g, '');
const BY_KEY = new Map<string, CsvColumn>(CSV_COLUMNS.map((c) => [key(c), c]));

/**
 * Spreadsheet formulae are escaped on export with a leading apostrophe (and so is a leading
 * apostrophe itself, so that a note starting with "'=" survives the round trip); take one off on
 * the way in.
 */
const unescapeFormula = (s: string) => (/^'[=+\-@\t\r']/.test(s) ? s.slice(1) : s);
const FORMULA_START = /^[=+\-@\t\r']/;

export class CsvTooManyRowsError extends Error {
  constructor(readonly rows: number) {
    super(`The file has more than ${CSV_MAX_ROWS.toLocaleString('en')} rows. Split it into smaller files.`);
    this.name = 'CsvTooManyRowsError';
  }
}

/**
 * Reads the file into rows with their line numbers (quoted notes may span lines, so lines are
 * counted from papaparse's cursor, not from the row index). Throws CsvTooManyRowsError past the
 * row limit, stopping early rather than reading a huge file to the end.
 */
export function parseTallyCsv(text: string): ParsedCsv {
  const src = text.replace(/^\uFEFF/, '');
  const issues: CsvIssue[] = [];
  const rows: CsvRow[] = [];
  let header: (CsvColumn | null)[] | null = null;
  let prevCursor = 0;
  let counted = 0;
  let line = 1;
  let rowCount = 0;
  let tooMany = false;
  const lineAt = (pos: number) => {
    for (; counted < pos && counted < src.length; counted++) if (src.charCodeAt(counted) === 10) line++;
    return line;
  };
  Papa.parse<string[]>(src, {
    skipEmptyLines: 'greedy',
    step: (res, parser) => {
      let start = prevCursor;
      while (start < src.length && /\s/.test(src[start]!)) start++;
      prevCursor = res.meta.cursor;
      const at = lineAt(start);
      const cells = res.data;
      if (!header) {
        header = cells.map((h) => BY_KEY.get(key(h)) ?? null);
        const seen = new Set<CsvColumn>();
        cells.forEach((h, i) => {
          const c = header![i];
          if (!c) issues.push({ line: at, column: h, value: cut(h), code: 'unknown_column', reason: `Unknown column "${cut(h)}"; it is ignored. Columns: ${CSV_COLUMNS.join(', ')}.` });
          else if (seen.has(c)) issues.push({ line: at, column: c, value: h, code: 'duplicate_column', reason: `Column "${c}" appears twice.` });
          if (c) seen.add(c);
        });
        for (const c of REQUIRED) {
          if (!seen.has(c)) issues.push({ line: at, column: c, value: '', code: 'missing_column', reason: `The header has no "${c}" column (required).` });
        }
        return;
      }
      rowCount++;
      if (rowCount > CSV_MAX_ROWS) {
        tooMany = true;
        parser.abort();
        return;
      }
      if (cells.length !== header.length) {
        issues.push({ line: at, column: null, value: cut(cells.join(',')), code: 'field_count', reason: `This row has ${cells.length} fields; the header has ${header.length}.` });
        return;
      }
      const row: CsvRow = { line: at, cells: {} };
      header.forEach((c, i) => {
        if (c && row.cells[c] === undefined) row.cells[c] = unescapeFormula((cells[i] ?? '').trim());
      });
      rows.push(row);
    },
  });
  if (tooMany) throw new CsvTooManyRowsError(rowCount);
  if (!header) issues.push({ line: 1, column: null, value: '', code: 'empty_file', reason: 'The file is empty: it needs a header row and at least one tally.' });
  const fatal = !header || issues.some((i) => i.code === 'missing_column' || i.code === 'duplicate_column');
  return { rows: fatal ? [] : rows, issues, fatal, rowCount };
}

export interface CsvContext {
  sites: ReadonlyArray<{ id: string; name: string }>;
  /** The outbreak's day 0: earlier dates are refused. */
  startDate: string;
  /** The last day accepted: later dates are in the future. */
  today: string;
  /** The live tally of a site and day, if any. */
  existing: (siteId: string, date: string) => (TallyValues & { version: number }) | undefined;
}

export interface ValidCsvRow {
  line: number;
  siteName: string;
  input: TallyInput;
}

export interface CsvReport {
  /** Data rows in the file. */
  rows: number;
  /** Rows that would be written. */
  valid: ValidCsvRow[];
  /** Lines equal to a tally already recorded: nothing to write, not an error. */
  unchanged: number[];
  issues: CsvIssue[];
  fatal: boolean;
}

type CountCheck = { ok: true; value: number | null } | { ok: false; code: CsvIssueCode; reason: string };

/** A count cell: blank → null; digits only (no thousands separators, units or signs that hide a mistake). */
export function parseCount(raw: string, label: string): CountCheck {
  const s = raw.trim();
  if (s === '') return { ok: true, value: null };
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(s)) return { ok: false, code: 'count_not_number', reason: `${label} "${cut(s)}" is not a number.` };
  const n = Number(s);
  if (n < 0) return { ok: false, code: 'count_negative', reason: `${label} cannot be negative.` };
  if (!Number.isInteger(n)) return { ok: false, code: 'count_not_integer', reason: `${label} must be a whole number of people.` };
  if (n > COUNT_MAX) return { ok: false, code: 'count_too_large', reason: `${label} is larger than ${COUNT_MAX.toLocaleString('en')}.` };
  return { ok: true, value: n };
}

const LABEL: Record<(typeof COUNT_COLUMNS)[number], string> = { newCases: 'New cases', recoveries: 'Recoveries', deaths: 'Deaths', admissions: 'Admissions' };

/**
 * Checks every row and says, for each bad one, which line, column and value, and why. Nothing is
 * written here: the caller writes `valid` in one transaction, or nothing.
 */
export function validateTallyRows(parsed: ParsedCsv, ctx: CsvContext): CsvReport {
  const issues: CsvIssue[] = [...parsed.issues];
  const siteByName = new Map(ctx.sites.map((s) => [s.name.trim().toLowerCase(), s]));
  const candidates: { row: CsvRow; siteId: string; siteName: string; date: string; input: TallyInput }[] = [];
  for (const row of parsed.rows) {
    const c = row.cells;
    const bad = (column: CsvColumn | null, code: CsvIssueCode, reason: string) =>
      issues.push({ line: row.line, column, value: cut(column ? (c[column] ?? '') : ''), code, reason });
    const before = issues.length;

    const siteName = c.site ?? '';
    const site = siteByName.get(siteName.toLowerCase());
    if (siteName === '') bad('site', 'site_missing', 'The site is empty.');
    else if (!site) bad('site', 'site_unknown', `No site "${cut(siteName)}" in this outbreak.`);

    const date = c.date ?? '';
    if (date === '') bad('date', 'date_missing', 'The date is empty.');
    else if (!/^\d{4}-\d{2}-\d{2}$/.test(date)) bad('date', 'date_format', `Write dates as YYYY-MM-DD (like ${ctx.today}).`);
    else if (!isIsoDay(date)) bad('date', 'date_invalid', 'This date does not exist.');
    else if (date > ctx.today) bad('date', 'date_future', `The date is after today (${ctx.today}).`);
    else if (date < ctx.startDate) bad('date', 'date_before_start', `The date is before the outbreak's day 0 (${ctx.startDate}).`);

    const counts: Partial<Record<(typeof COUNT_COLUMNS)[number], number | null>> = {};
    for (const f of COUNT_COLUMNS) {
      const r = parseCount(c[f] ?? '', LABEL[f]);
      if (!r.ok) bad(f, r.code, r.reason);
      else if (f === 'newCases' && r.value === null) bad(f, 'count_missing', 'New cases is empty (write 0 when there were none).');
      else counts[f] = r.value;
    }

    const note = c.note ?? '';
    if (note.length > NOTE_MAX) bad('note', 'note_too_long', `The note has ${note.length} characters; at most ${NOTE_MAX}.`);
    // eslint-disable-next-line no-control-regex
    else if (/[\u0000-\u0008\u000b-\u001f\u007f\u202a-\u202e\u2066-\u2069]/.test(note)) bad('note', 'note_control_chars', 'The note contains control characters.');

    if (issues.length > before || !site) continue;
    const input = { siteId: site.id, date, newCases: counts.newCases!, recoveries: counts.recoveries ?? null, deaths: counts.deaths ?? null, admissions: counts.admissions ?? null, note: note === '' ? null : note };
    // The form's and the route's own schema has the last word, so a CSV row can never hold what they refuse.
    const checked = tallyInputSchema.safeParse(input);
    if (!checked.success) {
      const first = checked.error.issues[0]!;
      bad((first.path[0] as CsvColumn | undefined) ?? null, 'invalid', first.message);
      continue;
    }
    candidates.push({ row, siteId: site.id, siteName: site.name, date, input: checked.data });
  }

  // Two rows for one site and day: which is right (or whether they add up) only a person knows,
  // so every row of the pair is held back, not just the later one.
  const lines = new Map<string, number[]>();
  for (const k of candidates) {
    const id = `${k.siteId}|${k.date}`;
    lines.set(id, [...(lines.get(id) ?? []), k.row.line]);
  }
  const valid: ValidCsvRow[] = [];
  const unchanged: number[] = [];
  for (const k of candidates) {
    const same = lines.get(`${k.siteId}|${k.date}`)!;
    if (same.length > 1) {
      const others = same.filter((l) => l !== k.row.line).join(', ');
      issues.push({ line: k.row.line, column: null, value: `${k.siteName} ${k.date}`, code: 'duplicate_in_file', reason: `${k.siteName} on ${k.date} is also on line ${others} of this file.` });
      continue;
    }
    const current = ctx.existing(k.siteId, k.date);
    if (current) {
      if (sameValues(normaliseValues(current), normaliseValues(k.input))) unchanged.push(k.row.line);
      else issues.push({ line: k.row.line, column: null, value: `${k.siteName} ${k.date}`, code: 'conflict_existing', reason: `A tally for ${k.siteName} on ${k.date} is already recorded (${current.newCases} new cases) with other values; change it in the table instead.` });
      continue;
    }
    valid.push({ line: k.row.line, siteName: k.siteName, input: k.input });
  }
  issues.sort((a, b) => a.line - b.line);
  return { rows: parsed.rowCount, valid, unchanged, issues, fatal: parsed.fatal };
}

export interface CsvTally {
  siteName: string;
  date: string;
  newCases: number;
  recoveries: number | null;
  deaths: number | null;
  admissions: number | null;
  note: string | null;
}

/** Tallies as CSV in the import format, so an export reads back in. Formulae are escaped for spreadsheets. */
export function serialiseTallyCsv(rows: ReadonlyArray<CsvTally>): string {
  const data = rows.map((r) => [r.siteName, r.date, r.newCases, r.recoveries ?? '', r.deaths ?? '', r.admissions ?? '', r.note ?? '']);
  return Papa.unparse({ fields: [...CSV_COLUMNS], data }, { escapeFormulae: FORMULA_START, newline: '\n' }) + '\n';
}

/** The answer of an import (preview or commit), as the route sends it. */
export interface ImportReport {
  /** Data rows in the file. */
  rows: number;
  /** Rows that can be (or were) written. */
  validCount: number;
  /** Rows equal to a tally already recorded. */
  unchangedCount: number;
  issues: CsvIssue[];
  issuesTotal: number;
  /** Issues per kind. */
  kinds: Partial<Record<CsvIssueCode, number>>;
  /** Lines with at least one issue. */
  badLines: number;
  /** The first valid rows, for the preview. */
  preview: { line: number; site: string; date: string; newCases: number; recoveries: number | null; deaths: number | null; admissions: number | null; note: string | null }[];
  /** True when the header lacks a required column. */
  fatal: boolean;
  /** Rows written (commit only). */
  imported?: number;
}
