/**
 * Practical instructions: Markdown with KaTeX formulas ($…$ inline, $$…$$ display), rendered to
 * HTML on the server and then sanitised, so an instructor's text can never run script in a
 * student's browser. Formulas are cut out before Markdown runs (so _ and * inside them survive)
 * and put back as KaTeX HTML.
 */
import katex from 'katex';
import { marked } from 'marked';
import sanitizeHtml from 'sanitize-html';

const MATHML = [
  'math', 'semantics', 'annotation', 'mrow', 'mi', 'mo', 'mn', 'ms', 'mtext', 'mspace', 'msup', 'msub', 'msubsup', 'mfrac',
  'msqrt', 'mroot', 'mover', 'munder', 'munderover', 'mtable', 'mtr', 'mtd', 'mstyle', 'mpadded', 'mphantom', 'menclose',
];
const LENGTH = /^-?[\d.]+(em|ex|px|%)?$/;

const SANITIZE: sanitizeHtml.IOptions = {
  allowedTags: [...sanitizeHtml.defaults.allowedTags, 'img', 'span', 'svg', 'path', 'line', ...MATHML],
  allowedAttributes: {
    a: ['href', 'title'],
    img: ['src', 'alt', 'title'],
    span: ['class', 'style', 'aria-hidden'],
    svg: ['xmlns', 'width', 'height', 'viewbox', 'viewBox', 'preserveaspectratio', 'preserveAspectRatio', 'style'],
    path: ['d'],
    line: ['x1', 'x2', 'y1', 'y2', 'stroke-width'],
    math: ['xmlns', 'display'],
    annotation: ['encoding'],
    mo: ['stretchy', 'fence', 'separator', 'lspace', 'rspace', 'mathvariant', 'minsize', 'maxsize'],
    mi: ['mathvariant'],
    mspace: ['width'],
    mstyle: ['scriptlevel', 'displaystyle', 'mathcolor'],
    mpadded: ['width', 'height', 'depth', 'voffset', 'lspace'],
    mtable: ['rowspacing', 'columnspacing', 'columnalign'],
    mtd: ['columnalign'],
    menclose: ['notation'],
    '*': [],
  },
  allowedSchemes: ['http', 'https', 'mailto'],
  allowedSchemesByTag: { img: ['https', 'data'] },
  allowedStyles: {
    '*': {
      height: [LENGTH], 'vertical-align': [LENGTH], 'margin-right': [LENGTH], 'margin-left': [LENGTH], top: [LENGTH],
      'min-width': [LENGTH], width: [LENGTH], 'border-bottom-width': [LENGTH], 'padding-left': [LENGTH], left: [LENGTH],
      'border-right-width': [LENGTH], 'border-top-width': [LENGTH], bottom: [LENGTH], 'margin-top': [LENGTH],
      position: [/^(relative|absolute)$/],
    },
  },
};

const MATH = /\$\$([\s\S]+?)\$\$|(?<![\\$])\$(?!\s)((?:\\\$|[^$\n])+?)(?<!\s)\$/g;

function renderFormula(tex: string, displayMode: boolean): string {
  return katex.renderToString(tex, { displayMode, throwOnError: false, strict: 'ignore', trust: false, maxSize: 50, maxExpand: 500, output: 'htmlAndMathml' });
}

/** Markdown + KaTeX → safe HTML. */
export function renderInstructions(markdown: string): string {
  const formulas: string[] = [];
  const withSlots = markdown.replace(MATH, (_, display: string | undefined, inline: string | undefined) => {
    formulas.push(display !== undefined ? renderFormula(display.trim(), true) : renderFormula(inline!, false));
    return `OSCMATH${formulas.length - 1}END`;
  });
  const html = marked.parse(withSlots, { async: false, gfm: true }) as string;
  const filled = html.replace(/OSCMATH(\d+)END/g, (_, i: string) => formulas[Number(i)] ?? '');
  return sanitizeHtml(filled, SANITIZE);
}
