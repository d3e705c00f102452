/**
 * A plot model (lib/spectrum/plot.ts — the same model the feedback PDF draws with pdf-lib) drawn
 * on screen as React SVG elements: role="img" with a <title> and <desc>, marker shapes that differ
 * without colour, each marker with its own <title> for a tooltip. Colours are CSS variables with
 * fallbacks that keep WCAG AA contrast on white (the variables are set in app/globals.css).
 *
 * No hooks and no browser APIs, so server components (the marking screen) and client components
 * (the student's form) both use it.
 */
import type { CSSProperties } from 'react';
import type { PlotModel } from '@/lib/spectrum/plot';
import { isOutlined, markerPath, plotColourCss, type MarkerGroup, type MarkerShape } from '@/lib/spectrum/plot-style';

const AXIS = 'currentColor';
const GRID = plotColourCss('grid');
const r2 = (v: number) => Math.round(v * 100) / 100;

/** Solid when the line matched a peak, hollow when it matched none; a tick is a stroke only. */
function markerStyle(m: { group: MarkerGroup; fill: 'solid' | 'hollow'; shape: MarkerShape }): CSSProperties {
  const colour = plotColourCss(m.group);
  if (m.shape === 'tick') return { stroke: colour, strokeWidth: 1.5, fill: 'none' };
  return isOutlined(m) ? { fill: 'none', stroke: colour, strokeWidth: 1.5 } : { fill: colour, stroke: colour, strokeWidth: 1 };
}

export function PlotFigure({
  model,
  title,
  idPrefix,
}: {
  model: PlotModel;
  title: string;
  /** Unique per page: the ids of the title and description. */ idPrefix: string;
}) {
  const id = idPrefix.replace(/[^A-Za-z0-9_-]/g, '');
  return (
    <svg
      xmlns="http://www.w3.org/2000/svg"
      viewBox={`0 0 ${model.width} ${model.height}`}
      width={model.width}
      height={model.height}
      role="img"
      aria-labelledby={`${id}-title`}
      aria-describedby={`${id}-desc`}
      className={`oscillab-plot oscillab-plot-${model.kind}`}
      style={{ fontFamily: 'inherit', fontSize: 11 }}
    >
      <title id={`${id}-title`}>{title}</title>
      <desc id={`${id}-desc`}>{model.description}</desc>
      <Axes model={model} />
      {model.zeroLine !== null && (
        <line
          className="zero-line"
          x1={model.area.left}
          y1={model.zeroLine}
          x2={model.area.left + model.area.width}
          y2={model.zeroLine}
          style={{ stroke: AXIS, strokeDasharray: '4 3' }}
          aria-hidden="true"
        />
      )}
      {model.curve.length > 1 && (
        <polyline
          className="spectrum"
          points={model.curve.map(([x, y]) => `${x},${y}`).join(' ')}
          style={{ fill: 'none', stroke: AXIS, strokeWidth: 1, strokeLinejoin: 'round' }}
          aria-hidden="true"
        />
      )}
      <Markers markers={model.markers} />
      {model.legend.length > 0 && (
        <g className="legend" aria-hidden="true">
          {model.legend.map((l, i) => (
            <g key={i}>
              <path d={markerPath(l.shape, l.x + 5, l.y - 4)} style={markerStyle(l)} />
              <text x={l.x + 14} y={l.y} style={{ fill: AXIS }}>
                {l.text}
              </text>
            </g>
          ))}
        </g>
      )}
    </svg>
  );
}

/** Grid, frame, ticks, tick labels and axis labels. */
function Axes({ model }: { model: PlotModel }) {
  const { area, xAxis, yAxis } = model;
  const bottom = area.top + area.height;
  const right = area.left + area.width;
  const yLabelX = 16;
  const yLabelY = r2(area.top + area.height / 2);
  return (
    <>
      <g className="grid" style={{ stroke: GRID, strokeWidth: 0.5 }} aria-hidden="true">
        {xAxis.ticks.map((t, i) => (
          <line key={`x${i}`} x1={t.pos} y1={area.top} x2={t.pos} y2={bottom} />
        ))}
        {yAxis.ticks.map((t, i) => (
          <line key={`y${i}`} x1={area.left} y1={t.pos} x2={right} y2={t.pos} />
        ))}
      </g>
      <g className="axes" style={{ stroke: AXIS, fill: 'none', strokeWidth: 1 }} aria-hidden="true">
        <rect x={area.left} y={area.top} width={area.width} height={area.height} />
        {xAxis.ticks.map((t, i) => (
          <line key={`x${i}`} x1={t.pos} y1={bottom} x2={t.pos} y2={bottom + 5} />
        ))}
        {yAxis.ticks.map((t, i) => (
          <line key={`y${i}`} x1={area.left - 5} y1={t.pos} x2={area.left} y2={t.pos} />
        ))}
      </g>
      <g className="tick-labels" style={{ fill: AXIS }} aria-hidden="true">
        {xAxis.ticks.map((t, i) => (
          <text key={`x${i}`} x={t.pos} y={bottom + 17} textAnchor="middle" style={{ fontVariantNumeric: 'tabular-nums' }}>
            {t.label}
          </text>
        ))}
        {yAxis.ticks.map((t, i) => (
          <text key={`y${i}`} x={area.left - 8} y={t.pos + 4} textAnchor="end" style={{ fontVariantNumeric: 'tabular-nums' }}>
            {t.label}
          </text>
        ))}
        <text x={r2(area.left + area.width / 2)} y={bottom + 36} textAnchor="middle" className="axis-label">
          {xAxis.label}
        </text>
        <text x={yLabelX} y={yLabelY} textAnchor="middle" transform={`rotate(-90 ${yLabelX} ${yLabelY})`} className="axis-label">
          {yAxis.label}
        </text>
      </g>
    </>
  );
}

function Markers({ markers }: { markers: PlotModel['markers'] }) {
  return (
    <g className="markers">
      {markers.map((m, i) => {
        const colour = plotColourCss(m.group);
        return (
          <g
            key={i}
            className={`marker marker-${m.group}${m.fill === 'hollow' ? ' marker-unmatched' : ''}`}
            data-value={m.value}
            data-label={m.label}
          >
            <title>{m.note}</title>
            {m.guide && (
              <line
                x1={m.x}
                y1={m.guide.y1}
                x2={m.x}
                y2={m.guide.y2}
                style={{ stroke: colour, strokeWidth: 0.75, strokeDasharray: m.fill === 'hollow' ? '3 2' : undefined, opacity: 0.8 }}
              />
            )}
            <path d={markerPath(m.shape, m.x, m.y)} style={markerStyle(m)} />
            {m.label && m.labelX !== undefined && m.labelY !== undefined && (
              <text
                x={m.labelX}
                y={m.labelY}
                transform={`rotate(${-(m.labelAngle ?? 0)} ${m.labelX} ${m.labelY})`}
                style={{ fill: colour, fontSize: 10 }}
              >
                {m.label}
              </text>
            )}
          </g>
        );
      })}
    </g>
  );
}
