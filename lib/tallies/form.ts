/**
 * The entry form's values (strings as typed) turned into a TallyInput, checked with the route's own
 * schema, with one specific message per bad field. Pure, so the form and its tests share it.
 */
import { tallyInputSchema, type TallyInput } from '@/lib/validation/tally';

export interface TallyFormValues {
  newCases: string;
  recoveries: string;
  deaths: string;
  admissions: string;
  note: string;
}

export const EMPTY_FORM: TallyFormValues = { newCases: '', recoveries: '', deaths: '', admissions: '', note: '' };

const num = (s: string): number | null => {
  const t = s.trim();
  if (t === '') return null;
  // Only plain digits count as a number: "1,000" or "12 people" is refused, not guessed at.
  return /^[+-]?\d+(\.\d+)?$/.test(t) ? Number(t) : Number.NaN;
};

export type FormErrors = Partial<Record<keyof TallyFormValues | 'date' | 'siteId', string>>;

export function parseTallyForm(
  v: TallyFormValues,
  ctx: { id?: string; siteId: string; date: string; baseVersion?: number | null; today: string; startDate?: string },
): { ok: true; input: TallyInput } | { ok: false; errors: FormErrors } {
  const errors: FormErrors = {};
  const newCases = num(v.newCases);
  if (newCases === null) errors.newCases = 'Required: write 0 when there were no new cases.';
  if (ctx.date > ctx.today) errors.date = `The date is after today (${ctx.today}).`;
  else if (ctx.startDate && ctx.date < ctx.startDate) errors.date = `The date is before the outbreak's day 0 (${ctx.startDate}).`;
  const candidate = {
    ...(ctx.id ? { id: ctx.id } : {}), siteId: ctx.siteId, date: ctx.date, newCases: newCases ?? 0,
    recoveries: num(v.recoveries), deaths: num(v.deaths), admissions: num(v.admissions),
    note: v.note.trim() === '' ? null : v.note, baseVersion: ctx.baseVersion ?? null,
  };
  const parsed = tallyInputSchema.safeParse(candidate);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const k = String(issue.path[0] ?? '') as keyof FormErrors;
      if (!errors[k]) errors[k] = issue.message === 'Invalid input: expected number, received NaN' ? 'Must be a number.' : issue.message;
    }
  }
  if (Object.keys(errors).length) return { ok: false, errors };
  return { ok: true, input: parsed.success ? parsed.data : candidate };
}
