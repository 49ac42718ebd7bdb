'use client';
import type { ScenarioInput, Summary } from '@/lib/model';
import { dayLabel } from '@/components/charts/chart-theme';
import { Figure } from './figure';
import {
  fmt, people, pct, readBedPeak, readBedsExceeded, readDoubling, readFinalSize, readHerd, readPeak, readR0,
} from './readings';

/** Largest value of a series, or null. */
export function seriesMax(a: Float64Array | undefined): number | null {
  if (!a || a.length === 0) return null;
  let m = -Infinity;
  for (const v of a) if (v > m) m = v;
  return m;
}

/** The headline figures of a Run, each with its plain reading. */
export function ScenarioFigures({ summary, input, startDate }: { summary: Summary; input: ScenarioInput; startDate?: string | null }) {
  const bedPeak = seriesMax(summary.bedDemand);
  const beds = input.capacity?.beds;
  return (
    <div data-testid="figures" className="grid gap-x-6 md:grid-cols-2">
      <Figure testId="fig-R0" label="R0" value={fmt(summary.R0, 3)} reading={`R0 ${fmt(summary.R0, 2)} — ${readR0(summary.R0)}`} />
      <Figure testId="fig-peak-day" label="Peak day" value={dayLabel(startDate, summary.peakDay)}
        reading={readPeak(summary.peakDay, summary.peakInfectious, startDate)} />
      <Figure testId="fig-peak" label="Peak prevalence" value={`${people(summary.peakInfectious)} people`}
        reading={`${pct(summary.peakInfectious / input.population, 2)} of the population infectious at once at the peak`} />
      <Figure testId="fig-final" label="Final size · attack rate" value={`${people(summary.finalSize)} · ${pct(summary.attackRate)}`}
        reading={readFinalSize(summary.finalSize, summary.attackRate, input.days)} />
      <Figure testId="fig-herd" label="Herd-immunity threshold" value={pct(summary.herdImmunityThreshold)} reading={readHerd(summary.herdImmunityThreshold)} />
      <Figure testId="fig-doubling" label="Doubling time" value={summary.doublingTime === null ? 'not growing' : `${fmt(summary.doublingTime)} days`}
        reading={readDoubling(summary.doublingTime)} />
      {beds !== undefined && (
        <>
          <Figure testId="fig-beds-exceeded" label="Beds run out" tone={summary.bedsExceededDay != null ? 'warning' : undefined}
            value={summary.bedsExceededDay == null ? 'not within horizon' : dayLabel(startDate, summary.bedsExceededDay)}
            reading={readBedsExceeded(summary.bedsExceededDay, beds, startDate)} />
          <Figure testId="fig-bed-peak" label="Bed demand at most" tone={bedPeak !== null && bedPeak > beds ? 'warning' : undefined}
            value={`${people(bedPeak)} beds`} reading={readBedPeak(bedPeak ?? 0, beds)} />
        </>
      )}
    </div>
  );
}
