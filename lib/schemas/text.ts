/**
 * Control characters are refused at the edge, in every text field of every schema: NUL and its
 * kin break the statistics pages and exports downstream, and a line break in a one-line field
 * (a course title) ends up cutting an e-mail header. Shared by the browser forms and the routes,
 * so nothing here may import server-only code.
 */
import './jitless';
import { z } from 'zod';

/** One-line fields: no C0 or C1 controls at all (tabs and line breaks included), no DEL, no Unicode line separators. */
// eslint-disable-next-line no-control-regex -- refusing control characters is the point of this pattern
export const LINE_CONTROL = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/;
/** Multi-line fields: tab, line feed and carriage return are text; every other control is refused. */
// eslint-disable-next-line no-control-regex -- refusing control characters is the point of this pattern
export const TEXT_CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;

export const LINE_MESSAGE = 'Keep this to one line, without tabs or control characters.';
export const TEXT_MESSAGE = 'Remove the control characters (such as NUL) from this text.';

/** A one-line text field. */
export const oneLine = (s: z.ZodString) => s.refine((v) => !LINE_CONTROL.test(v), LINE_MESSAGE);
/** A multi-line text field (instructions, comments, pasted line lists). */
export const multiLine = (s: z.ZodString) => s.refine((v) => !TEXT_CONTROL.test(v), TEXT_MESSAGE);
