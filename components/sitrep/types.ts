/**
 * Plain shapes of a situation report, shared by the server (lib/db/sitrep.ts), the page, the
 * charts and the e-mail summary. Days are `YYYY-MM-DD`; `day` numbers count from the outbreak's day 0.
 */
import type { ScenarioInput } from '@/lib/validation/scenario';

export interface SitrepSite {
  id: string;
  name: string;
  kind: string;
  /** People. */
  population: number;
  /** Cases to date, people. */
  cases: number;
  /** Cases in the 7 days to the cut-off, people. */
  casesLast7: number;
  /** Cases per 1,000 people at the site. */
  per1000: number;
  lastReport: string | null;
}

export interface SitrepCurveDay {
  date: string;
  /** New cases, people per day. */
  cases: number;
  avg7: number | null;
  cumulative: number;
  reported: boolean;
}

export interface SitrepGrowth {
  fromDate: string;
  toDate: string;
  /** Growth rate, per day, and its 95% Wald interval (quasi-Poisson widened when over-dispersed). */
  r: number;
  interval: [number, number];
  /** Days; Infinity when not doubling. */
  doublingTime: number;
  doublingInterval: [number, number];
  dispersion: number;
}

export interface SitrepRt {
  date: string;
  mean: number;
  lo: number;
  hi: number;
  /** Cases in the window, people. */
  cases: number;
  series: Array<{ date: string; mean: number; lo: number; hi: number }>;
  /** Serial interval mean and sd, days; window, days. */
  siMean: number;
  siSd: number;
  window: number;
}

export interface Band {
  p5: number[];
  p50: number[];
  p95: number[];
}

export interface SitrepForecast {
  /** 'official': the outbreak's official forecast; 'computed': fitted for this report (no official one). */
  source: 'official' | 'computed';
  scenarioId: string | null;
  scenarioVersion: number | null;
  name: string;
  /** Who published it and when (official only). */
  publishedAt: string | null;
  publishedBy: string | null;
  /** How the curves and bands were made, in plain words. */
  method: string;
  input: ScenarioInput;
  /** Dates of the forecast days (index = day since day 0). */
  dates: string[];
  incidence: Band;
  /** Occupied beds; null without bed settings. */
  bedDemand: Band | null;
  /** Beds available, beds; null when unknown. */
  beds: number | null;
  /** Whether the bands are a real spread (false: one run, p5 = p50 = p95). */
  banded: boolean;
  runs: number;
  peak: { date: string; range: [string, string]; infectious: number; infectiousRange: [number, number] };
  /** First day the central bed demand exceeds the beds, with the earliest (p95) and latest (p5) crossing. */
  bedsExceeded: { date: string | null; earliest: string | null; latest: string | null; share: number | null } | null;
  /** R0 of the forecast and its interval when known. */
  R0: number;
  R0Range: [number, number] | null;
}

export interface SitrepScenario {
  id: string;
  name: string;
  official: boolean;
  model: string;
  method: string;
  /** Days. */
  step: number;
  days: number;
  R0: number;
  peakDate: string;
  /** People. */
  peakInfectious: number;
  /** Fraction. */
  attackRate: number;
  /** Largest bed demand, beds; null without bed settings. */
  bedPeak: number | null;
  bedsExceededDate: string | null;
  interventions: string;
  /** Daily new infections, people per day, for the comparison chart. */
  incidence: number[];
  error: string | null;
}

export interface SitrepData {
  outbreak: { id: string; name: string; disease: string; area: string; population: number; startDate: string; beds: number | null };
  generatedAt: string;
  /** The last complete day: figures use days up to it. Null before any complete day. */
  cutoff: string | null;
  /** Cases to date (every tally, including days after the cut-off), people. */
  casesToDate: number;
  /** Cases in the 7 days to the cut-off, people. */
  casesLast7: number;
  /** Cases in the 7 days before those, people. */
  casesPrev7: number;
  sitesReportingAtCutoff: number;
  sitesInView: number;
  sites: SitrepSite[];
  curve: SitrepCurveDay[];
  growth: SitrepGrowth | null;
  rt: SitrepRt | null;
  forecast: SitrepForecast | null;
  scenarios: SitrepScenario[];
  /** Plain-language notes on what could not be computed. */
  notes: string[];
}
