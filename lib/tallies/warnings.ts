/**
 * Plausibility warnings on a tally before it is saved. They ask the person to confirm; they never
 * refuse a value (an outbreak can jump; a site's population can be out of date).
 */
export type EntryWarningCode = 'above_population' | 'tenfold_jump';

export interface EntryWarning {
  code: EntryWarningCode;
  /** The form field the warning is about. */
  field: 'newCases' | 'recoveries' | 'deaths' | 'admissions';
  message: string;
}

export interface WarningInput {
  newCases: number;
  recoveries?: number | null;
  deaths?: number | null;
  admissions?: number | null;
  /** People at the site. */
  population: number;
  /** New cases of the previous day at the same site; null or undefined when not reported. */
  previousNewCases?: number | null;
}

const COUNTS = ['newCases', 'recoveries', 'deaths', 'admissions'] as const;
const LABEL: Record<(typeof COUNTS)[number], string> = {
  newCases: 'New cases', recoveries: 'Recoveries', deaths: 'Deaths', admissions: 'Admissions',
};

/**
 * Counts above the site's population, and new cases more than ten times the previous day's.
 * A rise from 0 is measured against 1, so 0 → 10 passes and 0 → 11 warns: a start from nothing
 * is how every outbreak begins and a handful of cases is no typing slip.
 */
export function entryWarnings(v: WarningInput): EntryWarning[] {
  const out: EntryWarning[] = [];
  for (const f of COUNTS) {
    const n = v[f];
    if (typeof n === 'number' && n > v.population) {
      out.push({ code: 'above_population', field: f, message: `${LABEL[f]} (${n}) is more than the site's population (${v.population}).` });
    }
  }
  const prev = v.previousNewCases;
  if (typeof prev === 'number' && v.newCases > 10 * Math.max(prev, 1)) {
    out.push({ code: 'tenfold_jump', field: 'newCases', message: `New cases jump from ${prev} the day before to ${v.newCases}, more than tenfold.` });
  }
  return out;
}
