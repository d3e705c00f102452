'use client';
/**
 * Charts for the statistics page (recharts). Readable without colour: boxes and bars are hatched,
 * every bar carries its count as text, and each chart has an accessible name, a caption and a
 * table of the same values beside it.
 */
import { Bar, BarChart, CartesianGrid, ComposedChart, LabelList, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import type { QuantityStat } from '@/lib/statistics/queries';
import { formatPercent, quantityLabel, symlog, SYMLOG_TICKS, tickLabel } from '@/lib/statistics/scale';

const LO = symlog(-100);
const HI = symlog(1000);
const clamp = (v: number) => Math.min(HI, Math.max(LO, symlog(v)));

function Hatch({ id, colour }: { id: string; colour: string }) {
  return (
    <defs>
      <pattern id={id} width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
        <rect width="6" height="6" fill="#ffffff" />
        <line x1="0" y1="0" x2="0" y2="6" stroke={colour} strokeWidth="2.5" />
      </pattern>
    </defs>
  );
}

type BoxDatum = { name: string; range: [number, number]; q1: number; median: number; q3: number; stat: QuantityStat };

// Recharts hands the custom shape the pixel box of the [min, max] range; the quartiles are placed
// on the same linear (symlog) scale inside it.
function BoxShape(props: { x?: number; y?: number; width?: number; height?: number; payload?: BoxDatum; index?: number }) {
  const { x = 0, y = 0, width = 0, height = 0, payload } = props;
  if (!payload) return null;
  const [t0, t1] = payload.range;
  const px = (t: number) => (t1 > t0 ? x + ((t - t0) / (t1 - t0)) * width : x);
  const mid = y + height / 2;
  const h = Math.max(10, height * 0.7);
  const id = `box-hatch-${props.index ?? 0}`;
  return (
    <g>
      <Hatch id={id} colour="#1f5f74" />
      <line x1={px(t0)} x2={px(t1)} y1={mid} y2={mid} stroke="#1d2530" strokeWidth={1.2} />
      <line x1={px(t0)} x2={px(t0)} y1={mid - h / 3} y2={mid + h / 3} stroke="#1d2530" strokeWidth={1.2} />
      <line x1={px(t1)} x2={px(t1)} y1={mid - h / 3} y2={mid + h / 3} stroke="#1d2530" strokeWidth={1.2} />
      <rect x={px(payload.q1)} y={mid - h / 2} width={Math.max(2, px(payload.q3) - px(payload.q1))} height={h} fill={`url(#${id})`} stroke="#1d2530" strokeWidth={1.2} />
      <line x1={px(payload.median)} x2={px(payload.median)} y1={mid - h / 2 - 2} y2={mid + h / 2 + 2} stroke="#1d2530" strokeWidth={3} />
    </g>
  );
}

export function BoxPlotChart({ title, stats }: { title: string; stats: QuantityStat[] }) {
  const data: BoxDatum[] = stats
    .filter((s) => s.box)
    .map((s) => ({ name: quantityLabel(s.key, s.species), range: [clamp(s.box!.min), clamp(s.box!.max)], q1: clamp(s.box!.q1), median: clamp(s.box!.median), q3: clamp(s.box!.q3), stat: s }));
  if (!data.length) return <p className="text-ink-soft">No checked values to draw.</p>;
  const summary = data.map((d) => `${d.name}: median ${formatPercent(d.stat.box!.median)}, quartiles ${formatPercent(d.stat.box!.q1)} to ${formatPercent(d.stat.box!.q3)}`).join('; ');
  return (
    <figure role="img" aria-label={`${title}. ${summary}`} className="m-0">
      <div style={{ width: '100%', height: 46 * data.length + 40 }}>
        <ResponsiveContainer>
          <ComposedChart layout="vertical" data={data} margin={{ top: 8, right: 24, bottom: 8, left: 8 }}>
            <CartesianGrid horizontal={false} stroke="#d9d5c8" />
            <XAxis type="number" domain={[LO, HI]} ticks={SYMLOG_TICKS.map(symlog)} tickFormatter={(t: number) => tickLabel(SYMLOG_TICKS[SYMLOG_TICKS.map(symlog).findIndex((v) => Math.abs(v - t) < 1e-9)] ?? 0)} tick={{ fontSize: 11, fill: '#4a5361' }} />
            <YAxis type="category" dataKey="name" width={220} tick={{ fontSize: 12, fill: '#1d2530' }} />
            <Bar dataKey="range" isAnimationActive={false} shape={(p: unknown) => <BoxShape {...(p as object)} />} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="hint">
        Box: first to third quartile (hatched); thick bar: median; whiskers: minimum and maximum. Axis in percent, logarithmic beyond ±0.1 %, clipped at −100 % and +1000 %.
      </figcaption>
    </figure>
  );
}

export function HistogramChart({ stat }: { stat: QuantityStat }) {
  const bins = stat.histogram ?? [];
  const name = `${quantityLabel(stat.key, stat.species)}, ${stat.basis}`;
  const data = bins.map((b) => ({ ...b, tick: b.label.replace(/ %$/, '').replace(' to ', '…') }));
  const alt = data.filter((d) => d.count > 0).map((d) => `${d.label}: ${d.count}`).join('; ');
  return (
    <figure role="img" aria-label={`Histogram of relative deviation, ${name}. ${alt || 'no checked values'}`} className="m-0">
      <figcaption className="mb-1 text-sm font-bold">{name}</figcaption>
      <div style={{ width: '100%', height: 170 }}>
        <ResponsiveContainer>
          <BarChart data={data} margin={{ top: 16, right: 4, bottom: 28, left: 0 }}>
            <Hatch id={`hist-${stat.key}-${stat.species}-${stat.basis}`} colour="#1f5f74" />
            <CartesianGrid vertical={false} stroke="#eceae2" />
            <XAxis dataKey="tick" interval={0} angle={-50} textAnchor="end" height={36} tick={{ fontSize: 9, fill: '#4a5361' }} />
            <YAxis allowDecimals={false} width={28} tick={{ fontSize: 10, fill: '#4a5361' }} />
            <Bar dataKey="count" isAnimationActive={false} fill={`url(#hist-${stat.key}-${stat.species}-${stat.basis})`} stroke="#1f5f74">
              <LabelList dataKey="count" position="top" style={{ fontSize: 10, fill: '#1d2530' }} formatter={(v: unknown) => (Number(v) > 0 ? String(v) : '')} />
            </Bar>
          </BarChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
