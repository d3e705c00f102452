/**
 * Box plots of relative deviation, one row per quantity, drawn with plain HTML and CSS (no chart
 * library): they render on the server with the page, stretch to any width, and keep their labels
 * as text — beside the plot on a laptop, above it on a phone — so nothing is squeezed unreadable.
 * Read without colour: the box is hatched, the median a thick bar, and every row says its figures.
 */
import type { QuantityStat } from '@/lib/statistics/queries';
import { formatPercent, quantityLabel, symlog, SYMLOG_TICKS, tickLabel } from '@/lib/statistics/scale';

const LO = symlog(-100);
const HI = symlog(1000);
/** Position on the axis, 0–100 % of the strip (symmetric log scale, clipped at −100 % and +1000 %). */
const at = (percent: number) => ((Math.min(HI, Math.max(LO, symlog(percent))) - LO) / (HI - LO)) * 100;
const HATCH = 'repeating-linear-gradient(45deg, #ffffff 0 3px, #1f5f74 3px 4.5px)';

function Strip({ box }: { box: NonNullable<QuantityStat['box']> }) {
  const lo = at(box.min);
  const hi = at(box.max);
  const q1 = at(box.q1);
  const q3 = at(box.q3);
  return (
    <div className="relative h-8" aria-hidden="true">
      {SYMLOG_TICKS.map((t) => (
        <span key={t} className={`absolute inset-y-0 w-px ${t === 0 ? 'bg-rule-strong' : 'bg-rule'}`} style={{ left: `${at(t)}%` }} />
      ))}
      <span
        className="absolute top-1/2 h-[1.5px] -translate-y-1/2 bg-ink"
        style={{ left: `${lo}%`, width: `${Math.max(0.2, hi - lo)}%` }}
      />
      <span className="absolute top-2 h-4 w-[1.5px] bg-ink" style={{ left: `${lo}%` }} />
      <span className="absolute top-2 h-4 w-[1.5px] bg-ink" style={{ left: `calc(${hi}% - 1.5px)` }} />
      <span
        className="absolute top-1.5 h-5 border border-ink"
        style={{ left: `${q1}%`, width: `max(3px, ${q3 - q1}%)`, background: HATCH }}
      />
      <span className="absolute top-0.5 h-7 w-[3px] -translate-x-1/2 bg-ink" style={{ left: `${at(box.median)}%` }} />
    </div>
  );
}

export function BoxPlots({ title, stats }: { title: string; stats: QuantityStat[] }) {
  const rows = stats.filter((s) => s.box);
  if (!rows.length) return <p className="text-ink-soft">No checked values to draw.</p>;
  return (
    <figure className="m-0" aria-label={title} data-testid="box-plots">
      <ul className="space-y-2 sm:space-y-0">
        {rows.map((s) => {
          const b = s.box!;
          return (
            <li key={`${s.key}-${s.species}`} className="grid grid-cols-1 items-center gap-x-3 sm:grid-cols-[15rem_minmax(0,1fr)]">
              <div className="text-sm">
                <span>{quantityLabel(s.key, s.species)}</span>
                <span className="block text-xs text-ink-soft sm:hidden">
                  median <span className="num nowrap">{formatPercent(b.median)}</span>, middle half{' '}
                  <span className="num nowrap">{formatPercent(b.q1)}</span> to <span className="num nowrap">{formatPercent(b.q3)}</span>
                </span>
                <span className="sr-only">
                  : median {formatPercent(b.median)}, quartiles {formatPercent(b.q1)} to {formatPercent(b.q3)}, range {formatPercent(b.min)}{' '}
                  to {formatPercent(b.max)}.
                </span>
              </div>
              <Strip box={b} />
            </li>
          );
        })}
        <li className="grid grid-cols-1 gap-x-3 sm:grid-cols-[15rem_minmax(0,1fr)]" aria-hidden="true">
          <span className="hidden sm:block" />
          <div className="relative h-5 text-[10px] text-ink-soft">
            {SYMLOG_TICKS.map((t, i) => (
              <span
                key={t}
                // On a phone only every other label fits; the grid lines stay.
                className={`num absolute top-0 whitespace-nowrap ${Math.abs(t) === 10 || t === 100 ? 'hidden sm:inline' : ''} ${i === 0 ? '' : i === SYMLOG_TICKS.length - 1 ? '-translate-x-full' : '-translate-x-1/2'}`}
                style={{ left: `${at(t)}%` }}
              >
                {tickLabel(t)}
              </span>
            ))}
          </div>
        </li>
      </ul>
      <figcaption className="hint mt-1">
        Hatched box: the middle half of the students (first to third quartile); thick bar: median; whiskers: smallest and largest. Axis in
        percent, logarithmic beyond ±0.1 %, clipped at −100 % and +1000 %.
      </figcaption>
    </figure>
  );
}
