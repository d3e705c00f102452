'use client';
/**
 * Histograms for the statistics page (recharts; the box plots are plain HTML, box-plot.tsx).
 * Readable without colour: bars are hatched, every bar carries its count as text, and each chart
 * has an accessible name and a caption.
 */
import { Bar, BarChart, CartesianGrid, LabelList, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import type { QuantityStat } from '@/lib/statistics/queries';
import { quantityLabel } from '@/lib/statistics/scale';

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
