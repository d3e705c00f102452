/** Page size and the ink colours every Oscillab PDF is printed in (feedback, statistics summary, plots). */
import { rgb } from 'pdf-lib';

/** A4 in PDF points. */
export const A4 = { width: 595.28, height: 841.89 };
/** Body text and axes. */
export const INK = rgb(0.11, 0.15, 0.19);
/** Secondary text: subtitles, notes, footers. */
export const SOFT = rgb(0.29, 0.33, 0.38);
