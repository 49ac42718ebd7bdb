'use client';
import { dayRange } from '@/lib/tallies/dates';
import type { ReportingGrid as Grid } from '@/lib/data/tallies';

/**
 * Completeness at a glance: a row per site, a column per day; a filled cell carries the day's new
 * cases, an empty one with a dash means no tally was sent. Filled and empty differ in form
 * (solid box with a figure vs. hatched dash), not only in colour.
 */
export function ReportingGrid({ grid }: { grid: Grid }) {
  const days = dayRange(grid.from, grid.to);
  const reported = grid.sites.reduce((a, s) => a + days.filter((d) => s.dates[d] !== undefined).length, 0);
  const cells = grid.sites.length * days.length;
  return (
    <div className="flex flex-col gap-2">
      <p><span className="num font-bold">{reported}</span> of <span className="num">{cells}</span> site-days reported ({cells ? Math.round((100 * reported) / cells) : 0}%) from {grid.from} to {grid.to}.</p>
      <div className="overflow-x-auto">
        <table className="border-collapse text-sm" data-testid="reporting-grid">
          <thead>
            <tr>
              <th scope="col" className="sticky left-0 bg-panel px-2 text-left">Site</th>
              {days.map((d) => (
                <th key={d} scope="col" className="num px-0.5 text-center font-normal" title={d}>
                  <span className="block text-xs text-ink/70">{d.slice(5, 7)}</span>{d.slice(8)}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {grid.sites.map((s) => (
              <tr key={s.siteId}>
                <th scope="row" className="sticky left-0 whitespace-nowrap bg-panel px-2 text-left">{s.name}</th>
                {days.map((d) => {
                  const n = s.dates[d];
                  return n === undefined ? (
                    <td key={d} className="p-0.5"><span className="flex h-8 w-8 items-center justify-center rounded border border-dashed border-warning text-warning" title={`${s.name}, ${d}: no report`} aria-label={`${d}: no report`}>–</span></td>
                  ) : (
                    <td key={d} className="p-0.5"><span className="num flex h-8 w-8 items-center justify-center rounded bg-accent text-xs font-bold text-white" title={`${s.name}, ${d}: ${n} new cases`} aria-label={`${d}: ${n} new cases`}>{n}</span></td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
