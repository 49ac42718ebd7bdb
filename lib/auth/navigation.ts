import type { Role } from './roles';

export interface NavItem {
  href: string;
  label: string;
  /** Carries the chosen outbreak in the query (`?outbreak=…`). */
  scoped: boolean;
  /** Works without a network (a static client shell). */
  offline: boolean;
}

const item = (href: string, label: string, scoped = true, offline = true): NavItem => ({ href, label, scoped, offline });

const ENTRY = item('/entry', 'Record tallies');
const TALLIES = item('/tallies', 'Tallies & curve');
const SCENARIOS = item('/scenarios', 'Scenarios');
const FORECAST = item('/forecast', 'Forecast');
const OVERVIEW = item('/overview', 'Overview');
const SYNC = item('/sync', 'Sync', false);
const MERGE = item('/merge', 'Merge desk', true, false);
const LEDGER = item('/ledger', 'Sync ledger', false, false);
const SITREP = item('/sitrep', 'Sitrep', true, false);
const MANAGE = item('/manage', 'Outbreaks & sites', false, false);
const SHEETS = item('/sheets', 'Tally sheets', true, false);

/** Navigation per role (PRODUCT.md, "People and roles"). */
export const NAVIGATION: Record<Role, NavItem[]> = {
  field: [item('/field', 'Home', false), ENTRY, TALLIES, SCENARIOS, FORECAST, SYNC],
  coordinator: [OVERVIEW, ENTRY, TALLIES, SCENARIOS, FORECAST, MERGE, SITREP, SHEETS, MANAGE, SYNC],
  supervisor: [OVERVIEW, TALLIES, FORECAST, LEDGER, SITREP, SHEETS],
  admin: [item('/admin', 'Users', false, false), item('/mail', 'Sent mail', false, false)],
};

export const HOME: Record<Role, string> = { field: '/field', coordinator: '/overview', supervisor: '/overview', admin: '/admin' };

export function navHref(nav: NavItem, outbreakId: string | null): string {
  return nav.scoped && outbreakId ? `${nav.href}?outbreak=${encodeURIComponent(outbreakId)}` : nav.href;
}
