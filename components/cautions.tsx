import { Notice } from '@/components/ui/notice';

/**
 * The standing cautions (PRODUCT.md item 12; REFERENCES.md §8, common practice). Shown on every
 * forecast screen and in the sitrep.
 */
export function Cautions({ compact = false }: { compact?: boolean }) {
  return (
    <Notice tone="caution" className="text-sm">
      <p className="font-bold">A model run is a scenario, not a prediction.</p>
      {!compact && (
        <ul className="mt-1 list-disc pl-5">
          <li>It assumes a well-mixed, closed population and the parameters shown; real outbreaks differ.</li>
          <li>The most recent days are usually incomplete (reporting delay): a falling tail may not be real.</li>
          <li>Fits to short or early series are very uncertain: read the ranges, not only the central line.</li>
        </ul>
      )}
      <p className={compact ? '' : 'mt-1'}>
        Decisions rest with the local public-health authority and licensed clinical practice. Ebbcast stores aggregate
        counts per site and day only — never names or patient details.
      </p>
    </Notice>
  );
}
