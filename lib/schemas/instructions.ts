/**
 * Bounds on practical instructions (Markdown with $…$ / $$…$$ formulas), checked before anything
 * is rendered: deep nesting makes the Markdown and formula renderers recurse until the stack runs
 * out, and long runs of emphasis markers make Markdown slow. Real instructions stay far inside
 * these bounds. Pure, so the editor's form and the route check the same rules.
 */

/** The same formula pattern the renderer uses (lib/instructor/markdown.ts). */
export const MATH = /\$\$([\s\S]+?)\$\$|(?<![\\$])\$(?!\s)((?:\\\$|[^$\n])+?)(?<!\s)\$/g;

export const INSTRUCTION_LIMITS = {
  formulas: 500,
  formulaChars: 2000,
  /** Braces (and \left…\right pairs) inside one formula. */
  formulaDepth: 30,
  /** > markers in front of one line. */
  quoteDepth: 8,
  /** Spaces in front of a list item (two or four per level). */
  listIndent: 64,
  /** * and _ outside formulas, in all. */
  emphasisMarks: 2000,
};

function formulaDepth(tex: string): number {
  let depth = 0;
  let max = 0;
  for (let i = 0; i < tex.length; i++) {
    const c = tex[i];
    if (c === '\\') {
      if (tex.startsWith('left', i + 1)) depth++;
      else if (tex.startsWith('right', i + 1)) depth--;
      else {
        i++; // an escaped character (\{ \} \\) is not a group
        continue;
      }
    } else if (c === '{') depth++;
    else if (c === '}') depth--;
    if (depth > max) max = depth;
  }
  return max;
}

/** Why the instructions cannot be rendered safely, or null when they can. */
export function instructionsProblem(markdown: string): string | null {
  const L = INSTRUCTION_LIMITS;
  let formulas = 0;
  let problem: string | null = null;
  const prose = markdown.replace(MATH, (_, display: string | undefined, inline: string | undefined) => {
    const tex = display ?? inline ?? '';
    formulas++;
    if (!problem && tex.length > L.formulaChars)
      problem = `A formula is ${tex.length} characters long; keep each formula under ${L.formulaChars}.`;
    if (!problem && formulaDepth(tex) > L.formulaDepth) problem = `A formula nests braces more than ${L.formulaDepth} deep; simplify it.`;
    return ' ';
  });
  if (problem) return problem;
  if (formulas > L.formulas) return `The instructions hold ${formulas} formulas; at most ${L.formulas} can be shown.`;
  let marks = 0;
  for (const line of prose.split('\n')) {
    const quotes = /^(?:\s{0,3}>)+/.exec(line)?.[0].split('>').length ?? 1;
    if (quotes - 1 > L.quoteDepth) return `A quotation is nested ${quotes - 1} deep; at most ${L.quoteDepth} levels can be shown.`;
    const indent = /^([ \t]*)(?:[-*+]|\d{1,9}[.)])(?:\s|$)/.exec(line)?.[1].replace(/\t/g, '    ').length ?? 0;
    if (indent > L.listIndent)
      return `A list item is indented ${indent} spaces; lists can be nested about ${L.listIndent / 4} levels deep at most.`;
  }
  for (let i = 0; i < prose.length; i++) if (prose[i] === '*' || prose[i] === '_') marks++;
  if (marks > L.emphasisMarks)
    return `The instructions use ${marks} * and _ marks outside formulas; at most ${L.emphasisMarks} can be shown.`;
  return null;
}
