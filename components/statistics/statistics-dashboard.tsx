'use client';
/**
 * The statistics of one practical, fetched from /api/statistics/… through useApi (SWR). Every figure is
 * computed in the database by the API; this component only lays it out.
 */
import Link from 'next/link';
import { useState } from 'react';
import type { Comparison } from '@/lib/statistics/compare';
import type { PracticalReport } from '@/lib/statistics/report';
import type { QuantityStat } from '@/lib/statistics/queries';
import { useApi } from '@/lib/api-client';
import { formatPercent, quantityLabel } from '@/lib/statistics/scale';
import { TableScroll } from '@/components/ui/table-scroll';
import { DEFAULT_MARKER_THRESHOLD } from '@/lib/statistics/definitions';
import { BoxPlots } from './box-plot';
import { Histogram } from './histogram';

const BASES = [
  {
    basis: 'consistency',
    title: 'Consistency',
    lead: 'Is each derived number right from the student’s own measurements? (method and arithmetic)',
  },
  { basis: 'accuracy', title: 'Accuracy', lead: 'Is the measured value close to the accepted one? (the experiment)' },
] as const;

function Verdict({ kind, share, count }: { kind: 'within' | 'partial' | 'outside'; share: number; count: number }) {
  const look = {
    within: { symbol: '✓', word: 'within', cls: 'text-verdict-within bg-verdict-within-bg' },
    partial: { symbol: '◐', word: 'partial', cls: 'text-verdict-partial bg-verdict-partial-bg' },
    outside: { symbol: '✗', word: 'outside', cls: 'text-verdict-outside bg-verdict-outside-bg' },
  }[kind];
  return (
    <span className={`inline-block whitespace-nowrap rounded px-1.5 num text-xs ${look.cls}`}>
      <span aria-hidden="true">{look.symbol}</span> {look.word} {formatPercent(share * 100, 0)} ({count})
    </span>
  );
}

/**
 * `initial` is the report the page computed on the server (at the default marker threshold), so
 * the figures and tables arrive with the page; only a changed threshold fetches again.
 */
export function StatisticsDashboard({
  practicalId,
  cohortId,
  canExportMarks,
  initial,
}: {
  practicalId: number;
  cohortId: number | null;
  canExportMarks: boolean;
  initial?: PracticalReport;
}) {
  const [threshold, setThreshold] = useState(DEFAULT_MARKER_THRESHOLD);
  const [by, setBy] = useState<'cohort' | 'instrument'>('cohort');
  const q = new URLSearchParams();
  if (cohortId) q.set('cohortId', String(cohortId));
  const base = `/api/statistics/practicals/${practicalId}`;
  const { data, error, isLoading } = useApi<PracticalReport>(`${base}?${q}&threshold=${threshold}`, {
    keepPreviousData: true,
    fallbackData: threshold === DEFAULT_MARKER_THRESHOLD ? initial : undefined,
    revalidateOnMount: !initial,
    revalidateOnFocus: false,
  });
  const compare = useApi<Comparison>(`${base}/compare?by=${by}`);

  if (error)
    return (
      <p role="alert" className="card error-text">
        {error.message}
      </p>
    );
  if (isLoading || !data)
    return (
      <p className="card text-ink-soft" aria-live="polite">
        Loading statistics…
      </p>
    );
  const c = data.counts;
  const qs = q.toString();

  return (
    <div className="space-y-8">
      <section aria-labelledby="exports-h" className="flex flex-wrap items-center gap-2">
        <h2 id="exports-h" className="sr-only">
          Exports
        </h2>
        {canExportMarks && (
          <a className="btn" href={`${base}/export/marks?${qs}`} download>
            Marks CSV (student records)
          </a>
        )}
        <a className="btn-quiet" href={`${base}/export/statistics?${qs}`} download>
          Statistics CSV
        </a>
        <a className="btn-quiet" href={`${base}/export/summary?${qs}`} download>
          PDF summary
        </a>
      </section>

      <section aria-labelledby="counts-h" className="card">
        <h2 id="counts-h">Submissions — {data.scope.label}</h2>
        <dl className="mt-3 grid grid-cols-3 gap-4 sm:grid-cols-6">
          {(
            [
              ['Students', c.students],
              ['Submitted', c.submitted],
              ['On time', c.onTime],
              ['Late', c.late],
              ['Marked', c.marked],
              ['Released', c.released],
            ] as const
          ).map(([label, v]) => (
            <div key={label}>
              <dt className="text-xs font-bold uppercase tracking-wide text-ink-soft">{label}</dt>
              <dd className="num text-xl">{v}</dd>
            </div>
          ))}
        </dl>
        {data.suppressed && (
          <p className="mt-3 text-ink-soft">
            Fewer than {data.minGroup} students in this group: only counts are shown, no distributions or means.
          </p>
        )}
      </section>

      {!data.suppressed &&
        BASES.map(({ basis, title, lead }) => {
          const stats = data.quantities.filter((s) => s.basis === basis);
          return (
            <section key={basis} aria-labelledby={`${basis}-h`} className="card space-y-4">
              <div>
                <h2 id={`${basis}-h`}>{title}: relative deviation per quantity</h2>
                <p className="text-ink-soft">{lead}</p>
              </div>
              <BoxPlots title={`Box plots of relative deviation, ${basis}`} stats={stats} />
              <QuantityTable stats={stats} caption={`${title}: figures per quantity`} />
              <h3>Histograms</h3>
              <p className="hint">
                Buckets of relative deviation in percent, narrow near zero (rounding) and wide outside (slips): below −10, −10 to −5, −5 to
                −2, −2 to −1, −1 to −0.5, −0.5 to −0.2, −0.2 to 0, and the same upwards; the outer buckets (plainer hatching) are open.
              </p>
              <div className="grid gap-x-6 gap-y-5 sm:grid-cols-2 lg:grid-cols-3">
                {stats
                  .filter((s) => s.histogram)
                  .map((s) => (
                    <Histogram key={`${s.key}-${s.species}`} stat={s} />
                  ))}
              </div>
            </section>
          );
        })}

      <SlipSection data={data} />

      <MarkerSection data={data} threshold={threshold} setThreshold={setThreshold} />

      <section aria-labelledby="compare-h" className="card space-y-3">
        <h2 id="compare-h">Across cohorts and years</h2>
        <fieldset className="flex gap-4">
          <legend className="label">Side by side per</legend>
          {(['cohort', 'instrument'] as const).map((v) => (
            <label key={v} className="flex items-center gap-1 text-sm">
              <input type="radio" name="compare-by" value={v} checked={by === v} onChange={() => setBy(v)} /> {v}
            </label>
          ))}
        </fieldset>
        {compare.error ? (
          <p className="error-text">{compare.error.message}</p>
        ) : !compare.data ? (
          <p className="text-ink-soft">Loading…</p>
        ) : (
          <ComparisonTable data={compare.data} />
        )}
      </section>
    </div>
  );
}

function SlipSection({ data }: { data: PracticalReport }) {
  return (
    <section aria-labelledby="slips-h" className="card">
      <h2 id="slips-h">Most frequent slips</h2>
      {data.slips.length === 0 ? (
        <p className="text-ink-soft">No slips named in this group.</p>
      ) : (
        <table className="data-table stack-table mt-2" data-testid="slip-table">
          <caption className="sr-only">Most frequent named slips, with an example submission each</caption>
          <thead>
            <tr>
              <th scope="col">Slip</th>
              <th scope="col">Found in</th>
              <th scope="col" className="num">
                Times found
              </th>
              <th scope="col" className="num">
                Submissions
              </th>
              <th scope="col">Example</th>
            </tr>
          </thead>
          <tbody>
            {data.slips.map((s) => (
              <tr key={s.code} data-slip={s.code}>
                <td data-label="">
                  <strong className="sm:font-normal">{s.title}</strong>
                </td>
                <td data-label="Found in">{s.quantities.join(', ')}</td>
                <td className="num" data-label="Times found">
                  {s.count}
                </td>
                <td className="num" data-label="Submissions">
                  {s.submissions}
                </td>
                <td data-label="Example">
                  <Link href={s.exampleHref}>{s.example}</Link>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}

/** Each marker's marks against the others', flagged beyond the threshold the lead chooses. */
function MarkerSection({ data, threshold, setThreshold }: { data: PracticalReport; threshold: number; setThreshold: (v: number) => void }) {
  return (
    <section aria-labelledby="markers-h" className="card space-y-3">
      <h2 id="markers-h">Marker consistency</h2>
      <p className="text-ink-soft">
        Marks as a share of the maximum; difference = TA mark − engine proposal, in percentage points of the maximum. Spread is the
        population standard deviation.
        {!data.markers.namesShown && ' Other markers are shown without their names.'}
      </p>
      <label className="label" htmlFor="threshold">
        Flag a marker whose mean differs from the others’ by more than (percentage points)
      </label>
      <input
        id="threshold"
        className="field max-w-32"
        type="number"
        min={0}
        max={100}
        step={1}
        value={threshold}
        onChange={(e) => {
          const v = Number(e.target.value);
          if (Number.isFinite(v) && v >= 0 && v <= 100) setThreshold(v);
        }}
      />
      {data.markers.rows.length === 0 ? (
        <p className="text-ink-soft">Nothing marked yet.</p>
      ) : (
        <TableScroll label="Marker consistency table">
          <table className="data-table">
            <caption className="sr-only">Marker consistency per marker</caption>
            <thead>
              <tr>
                <th scope="col">Marker</th>
                <th scope="col" className="num">
                  Marked
                </th>
                <th scope="col" className="num">
                  Mean mark
                </th>
                <th scope="col" className="num">
                  Spread
                </th>
                <th scope="col" className="num">
                  Others’ mean
                </th>
                <th scope="col" className="num">
                  Mean difference
                </th>
                <th scope="col" className="num">
                  Spread
                </th>
                <th scope="col" className="num">
                  Overrides
                </th>
                <th scope="col" className="num">
                  Moderation changes
                </th>
                <th scope="col">Flag</th>
              </tr>
            </thead>
            <tbody>
              {data.markers.rows.map((m) => (
                <tr key={m.label}>
                  <td>{m.label}</td>
                  <td className="num">{m.submissions}</td>
                  <td className="num">{m.suppressed ? '—' : formatPercent(m.meanMark, 1)}</td>
                  <td className="num">{m.suppressed ? '—' : formatPercent(m.sdMark, 1)}</td>
                  <td className="num">{formatPercent(m.othersMean, 1)}</td>
                  <td className="num">{m.suppressed ? '—' : formatPercent(m.meanDifference, 1)}</td>
                  <td className="num">{m.suppressed ? '—' : formatPercent(m.sdDifference, 1)}</td>
                  <td className="num">{m.overrides}</td>
                  <td className="num">
                    {m.moderationChanges} of {m.moderations}
                  </td>
                  <td>
                    {m.flagged ? (
                      <span className="rounded bg-verdict-outside-bg px-1.5 text-verdict-outside">
                        <span aria-hidden="true">⚑ </span>differs by more than {data.markers.threshold} points
                      </span>
                    ) : m.suppressed ? (
                      `fewer than ${data.minGroup} marked`
                    ) : (
                      'no'
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </TableScroll>
      )}
    </section>
  );
}

/**
 * Centre and spread per quantity as median and interquartile range: one student's ×1000 slip
 * would drag a mean far from every other student (a mean of 12 188 % from a single outlier),
 * while the median and the middle half stay where the cohort is. The mean is in the CSV export.
 */
function QuantityTable({ stats, caption }: { stats: QuantityStat[]; caption: string }) {
  return (
    <div>
      <table className="data-table stack-table">
        <caption className="sr-only">{caption}</caption>
        <thead>
          <tr>
            <th scope="col">Quantity</th>
            <th scope="col" className="num">
              n
            </th>
            <th scope="col">Verdicts</th>
            <th scope="col" className="num">
              Median
            </th>
            <th scope="col" className="num">
              Middle half (Q1 to Q3)
            </th>
            <th scope="col" className="num">
              Range
            </th>
          </tr>
        </thead>
        <tbody>
          {stats.map((s) => (
            <tr key={`${s.key}-${s.species}`} data-quantity={`${s.key}:${s.species}`}>
              <td data-label="">
                <span className="font-bold sm:font-normal">{quantityLabel(s.key, s.species)}</span>
              </td>
              <td className="num nowrap" data-label="n">
                {s.n}
              </td>
              <td data-label="Verdicts">
                {s.suppressed || !s.shares || !s.verdicts ? (
                  <span className="text-ink-soft">fewer than 5 students</span>
                ) : (
                  <span className="flex flex-wrap gap-1">
                    <Verdict kind="within" share={s.shares.within} count={s.verdicts.within} />
                    <Verdict kind="partial" share={s.shares.partial} count={s.verdicts.partial} />
                    <Verdict kind="outside" share={s.shares.outside} count={s.verdicts.outside} />
                    {s.verdicts.notChecked > 0 && (
                      <span className="inline-block whitespace-nowrap rounded bg-verdict-unchecked-bg px-1.5 text-xs text-verdict-unchecked">
                        <span aria-hidden="true">○</span> not checked {s.verdicts.notChecked}
                      </span>
                    )}
                  </span>
                )}
              </td>
              <td className="num" data-label="Median">
                <span className="nowrap">{formatPercent(s.box?.median)}</span>
              </td>
              <td className="num" data-label="Middle half">
                {s.box ? (
                  <span>
                    <span className="nowrap">{formatPercent(s.box.q1)}</span> to <span className="nowrap">{formatPercent(s.box.q3)}</span>
                  </span>
                ) : (
                  '—'
                )}
              </td>
              <td className="num" data-label="Range">
                {s.box ? (
                  <span>
                    <span className="nowrap">{formatPercent(s.box.min)}</span> to <span className="nowrap">{formatPercent(s.box.max)}</span>
                  </span>
                ) : (
                  '—'
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="hint mt-2">
        Median and middle half (interquartile range) of the relative deviation; no mean is shown, because a single slip of ×1000 would move
        it further than all the other students together. The statistics CSV also has the mean.
      </p>
    </div>
  );
}

function ComparisonTable({ data }: { data: Comparison }) {
  if (!data.groups.length) return <p className="text-ink-soft">No other cohorts ran this practical.</p>;
  const keys = [...new Map(data.groups.flatMap((g) => g.quantities).map((q) => [`${q.key}|${q.species}|${q.basis}`, q])).values()];
  return (
    <TableScroll label="Comparison between cohorts">
      <table className="data-table">
        <caption className="text-left text-sm text-ink-soft">
          Practicals titled “{data.title}”: median relative deviation and share within tolerance per group
        </caption>
        <thead>
          <tr>
            <th scope="col">Figure</th>
            {data.groups.map((g) => (
              <th key={g.group} scope="col" className="num">
                {g.label}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          <tr>
            <th scope="row">Submitted (late)</th>
            {data.groups.map((g) => (
              <td key={g.group} className="num">
                {g.counts.submitted} ({g.counts.late})
              </td>
            ))}
          </tr>
          <tr>
            <th scope="row">Marked / released</th>
            {data.groups.map((g) => (
              <td key={g.group} className="num">
                {g.counts.marked} / {g.counts.released}
              </td>
            ))}
          </tr>
          <tr>
            <th scope="row">Mean mark (spread)</th>
            {data.groups.map((g) => (
              <td key={g.group} className="num">
                {g.suppressed ? 'counts only' : `${formatPercent(g.meanMark, 1)} (${formatPercent(g.sdMark, 1)})`}
              </td>
            ))}
          </tr>
          {keys.map((k) => (
            <tr key={`${k.key}|${k.species}|${k.basis}`}>
              <th scope="row">
                {quantityLabel(k.key, k.species)} · {k.basis}
              </th>
              {data.groups.map((g) => {
                const q = g.quantities.find((x) => x.key === k.key && x.species === k.species && x.basis === k.basis);
                return (
                  <td key={g.group} className="num">
                    {!q
                      ? '—'
                      : q.suppressed || !q.shares
                        ? `n ${q.n}`
                        : `${formatPercent(q.box?.median)} · ✓ ${formatPercent(q.shares.within * 100, 0)}`}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </TableScroll>
  );
}
