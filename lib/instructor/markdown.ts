/**
 * Practical instructions: Markdown with KaTeX formulas ($…$ inline, $$…$$ display), rendered to
 * HTML on the server and then sanitised, so an instructor's text can never run script in a
 * student's browser. Formulas are cut out before Markdown runs (so _ and * inside them survive)
 * and put back as KaTeX HTML.
 */
import katex from 'katex';
import { marked } from 'marked';
import sanitizeHtml from 'sanitize-html';
import crypto from 'node:crypto';
import { instructionsProblem, MATH } from '@/lib/schemas/instructions';

const MATHML = [
  'math',
  'semantics',
  'annotation',
  'mrow',
  'mi',
  'mo',
  'mn',
  'ms',
  'mtext',
  'mspace',
  'msup',
  'msub',
  'msubsup',
  'mfrac',
  'msqrt',
  'mroot',
  'mover',
  'munder',
  'munderover',
  'mtable',
  'mtr',
  'mtd',
  'mstyle',
  'mpadded',
  'mphantom',
  'menclose',
];
const LENGTH = /^-?[\d.]+(em|ex|px|%)?$/;

const SANITIZE: sanitizeHtml.IOptions = {
  allowedTags: [...sanitizeHtml.defaults.allowedTags, 'img', 'span', 'svg', 'path', 'line', ...MATHML],
  allowedAttributes: {
    a: ['href', 'title'],
    img: ['src', 'alt', 'title'],
    span: ['class', 'style', 'aria-hidden'],
    p: ['class', 'role'],
    code: ['class', 'title'],
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
      height: [LENGTH],
      'vertical-align': [LENGTH],
      'margin-right': [LENGTH],
      'margin-left': [LENGTH],
      top: [LENGTH],
      'min-width': [LENGTH],
      width: [LENGTH],
      'border-bottom-width': [LENGTH],
      'padding-left': [LENGTH],
      left: [LENGTH],
      'border-right-width': [LENGTH],
      'border-top-width': [LENGTH],
      bottom: [LENGTH],
      'margin-top': [LENGTH],
      position: [/^(relative|absolute)$/],
    },
  },
};

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/** A notice in place of what could not be rendered, in words a reader can act on. */
function notice(message: string): string {
  return `<p class="render-problem" role="note"><strong>Not shown:</strong> ${escapeHtml(message)}</p>`;
}

function renderFormula(tex: string, displayMode: boolean): string {
  try {
    return katex.renderToString(tex, {
      displayMode,
      throwOnError: false,
      strict: 'ignore',
      trust: false,
      maxSize: 50,
      maxExpand: 500,
      output: 'htmlAndMathml',
    });
  } catch {
    // throwOnError covers syntax; anything else (a renderer limit) still must not fail the page.
    return `<code class="render-problem" title="This formula could not be typeset">${escapeHtml(tex)}</code>`;
  }
}

function render(markdown: string): string {
  const problem = instructionsProblem(markdown);
  if (problem) {
    // Text stored before the bounds existed: shown as plain text with the reason, never a server error.
    return `${notice(`the instructions could not be formatted. ${problem}`)}<pre class="whitespace-pre-wrap">${escapeHtml(markdown.slice(0, 50_000))}</pre>`;
  }
  const formulas: string[] = [];
  const withSlots = markdown.replace(MATH, (_, display: string | undefined, inline: string | undefined) => {
    formulas.push(display !== undefined ? renderFormula(display.trim(), true) : renderFormula(inline!, false));
    return `OSCMATH${formulas.length - 1}END`;
  });
  let html: string;
  try {
    html = marked.parse(withSlots, { async: false, gfm: true }) as string;
  } catch {
    return `${notice('the instructions could not be formatted; they are shown as plain text.')}<pre class="whitespace-pre-wrap">${escapeHtml(markdown)}</pre>`;
  }
  const filled = html.replace(/OSCMATH(\d+)END/g, (_, i: string) => formulas[Number(i)] ?? '');
  return sanitizeHtml(filled, SANITIZE);
}

/** Rendered instructions by content: the same text is shown to every student of a practical. */
const cache = new Map<string, string>();
const CACHE_ENTRIES = 200;

/** Markdown + KaTeX → safe HTML. Never throws: what cannot be rendered is shown as a readable notice. */
/** POST /api/practicals/markdown's answer: the instructions as students will see them. */
export type InstructionsPreview = { html: string };

export function renderInstructions(markdown: string): string {
  const key = crypto.createHash('sha256').update(markdown).digest('base64');
  const hit = cache.get(key);
  if (hit !== undefined) {
    cache.delete(key);
    cache.set(key, hit); // most recently used last
    return hit;
  }
  const html = render(markdown);
  cache.set(key, html);
  if (cache.size > CACHE_ENTRIES) cache.delete(cache.keys().next().value!);
  return html;
}
