/**
 * How a plot's markers look, written once for both renderers of a PlotModel
 * (components/plots/plot-figure.tsx on screen, lib/pdf/draw-plot.ts in the PDF): the shape each group
 * is drawn with, so branches differ without colour, the marker size, the colours, and the path
 * of each shape.
 */

export type MarkerShape = 'triangle-down' | 'circle' | 'diamond' | 'tick';
export type MarkerGroup = 'P' | 'R' | 'unassigned' | 'peak';

/** Marker size in model pixels (the side of the box a marker fills). */
export const MARKER_SIZE = 7;

/** The shape each group is drawn with. */
export const MARKER_SHAPE: Readonly<Record<MarkerGroup, MarkerShape>> = {
  P: 'triangle-down',
  R: 'circle',
  unassigned: 'diamond',
  peak: 'tick',
};

export type PlotColourName = 'grid' | MarkerGroup;

/** Colours as hex, each with WCAG-AA contrast on white except the grid (decoration only). */
export const PLOT_COLOURS: Readonly<Record<PlotColourName, string>> = {
  grid: '#d4d4d4',
  P: '#a3400b',
  R: '#1d5a9e',
  unassigned: '#4d4d4d',
  peak: '#5c5c5c',
};

/** The CSS variable a page may set to restyle each colour on screen. */
export const PLOT_COLOUR_VARIABLES: Readonly<Record<PlotColourName, string>> = {
  grid: '--plot-grid',
  P: '--plot-branch-p',
  R: '--plot-branch-r',
  unassigned: '--plot-unassigned',
  peak: '--plot-peak',
};

/** A plot colour as a CSS value: its variable, falling back to the hex value. */
export function plotColourCss(name: PlotColourName): string {
  return `var(${PLOT_COLOUR_VARIABLES[name]}, ${PLOT_COLOURS[name]})`;
}

/** A hex colour as red, green and blue from 0 to 1 (for pdf-lib's rgb). */
export function hexToUnitRgb(hex: string): [number, number, number] {
  const n = Number.parseInt(hex.slice(1), 16);
  return [((n >> 16) & 0xff) / 255, ((n >> 8) & 0xff) / 255, (n & 0xff) / 255];
}

function round2(v: number): number {
  return Math.round(v * 100) / 100;
}

/** SVG path data of a marker centred on (x, y); a circle is two arcs, so every marker is one path. */
export function markerPath(shape: MarkerShape, x: number, y: number, s = MARKER_SIZE): string {
  const h = s / 2;
  switch (shape) {
    case 'triangle-down':
      return `M${round2(x - h)} ${round2(y - h)}H${round2(x + h)}L${round2(x)} ${round2(y + h)}Z`;
    case 'diamond':
      return `M${round2(x)} ${round2(y - h)}L${round2(x + h)} ${round2(y)}L${round2(x)} ${round2(y + h)}L${round2(x - h)} ${round2(y)}Z`;
    case 'tick':
      return `M${round2(x)} ${round2(y - h)}V${round2(y + h)}`;
    case 'circle':
      return `M${round2(x - h)} ${round2(y)}a${h} ${h} 0 1 0 ${s} 0a${h} ${h} 0 1 0 ${-s} 0Z`;
  }
}

/** A tick, and any hollow marker, is drawn as an outline; the rest are filled. */
export function isOutlined(m: { shape: MarkerShape; fill: 'solid' | 'hollow' }): boolean {
  return m.shape === 'tick' || m.fill === 'hollow';
}
