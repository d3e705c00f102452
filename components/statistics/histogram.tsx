/**
 * A histogram of relative deviation in plain HTML and CSS (no chart library): it comes with the
 * page from the server, needs no script to appear, and stretches to its box. Readable without
 * colour: bars are hatched (the open outer buckets plainer), every bar carries its count, and the
 * figure's accessible name lists the counts.
 */
import { HISTOGRAM_EDGES_PERCENT, bucketLabel } from '@/lib/statistics/definitions';
import type { QuantityStat } from '@/lib/statistics/queries';
import { quantityLabel } from '@/lib/statistics/scale';

const HATCH = 'repeating-linear-gradient(45deg, #ffffff 0 2px, #1f5f74 2px 4px)';
const OUTER = 'repeating-linear-gradient(45deg, #ffffff 0 2px, #b5ae9c 2px 4px)';
/** Edges labelled under the axis (the rest are in the accessible name and the caption of the section). */
const LABELLED = [-10, -1, 0, 1, 10];

export function Histogram({ stat }: { stat: QuantityStat }) {
  const bins = stat.histogram ?? [];
  const max = Math.max(1, ...bins.map((b) => b.count));
  const name = `${quantityLabel(stat.key, stat.species)}, ${stat.basis}`;
  const alt = bins
    .filter((b) => b.count > 0)
    .map((b) => `${bucketLabel(b.bucket)}: ${b.count}`)
    .join('; ');
  const n = bins.length;
  return (
    <figure className="m-0" data-testid="histogram">
      <figcaption className="mb-1 text-sm font-bold">{name}</figcaption>
      <div role="img" aria-label={`Histogram of relative deviation, ${name}. ${alt || 'no checked values'}`}>
        <div className="flex h-32 items-stretch gap-[2px] border-b border-ink pt-4" aria-hidden="true">
          {bins.map((b, i) => (
            <div key={b.bucket} className="relative flex flex-1 flex-col justify-end">
              {b.count > 0 && (
                <>
                  <span
                    className="num absolute inset-x-0 text-center text-[10px] leading-none"
                    style={{ bottom: `calc(${(b.count / max) * 100}% + 2px)` }}
                  >
                    {b.count}
                  </span>
                  <span
                    className="block w-full border border-b-0 border-accent"
                    style={{ height: `${(b.count / max) * 100}%`, background: i === 0 || i === n - 1 ? OUTER : HATCH }}
                  />
                </>
              )}
            </div>
          ))}
        </div>
        <div className="num relative h-4 text-[10px] text-ink-soft" aria-hidden="true">
          {LABELLED.map((edge) => {
            const k = HISTOGRAM_EDGES_PERCENT.indexOf(edge as (typeof HISTOGRAM_EDGES_PERCENT)[number]);
            if (k < 0) return null;
            return (
              <span key={edge} className="absolute top-0.5 -translate-x-1/2 whitespace-nowrap" style={{ left: `${((k + 1) / n) * 100}%` }}>
                {edge === 0 ? '0' : `${edge > 0 ? '+' : '−'}${Math.abs(edge)}`}
              </span>
            );
          })}
        </div>
      </div>
    </figure>
  );
}
