import fs from 'node:fs';
import path from 'node:path';

/**
 * Text for e-mails and PDFs lives in templates/. A template is plain text with {{name}}
 * placeholders; an e-mail template's first line is "Subject: …".
 */
const cache = new Map<string, string>();

export function templateText(name: string): string {
  if (!/^[a-z0-9/-]+\.(txt|md)$/.test(name)) throw new Error(`Bad template name: ${name}`);
  let text = cache.get(name);
  if (text === undefined) {
    text = fs.readFileSync(path.join(/*turbopackIgnore: true*/ process.cwd(), 'templates', name), 'utf8');
    cache.set(name, text);
  }
  return text;
}

export function fill(text: string, values: Record<string, string | number>): string {
  return text.replace(/\{\{\s*([a-zA-Z0-9_]+)\s*\}\}/g, (_, key: string) => {
    if (!(key in values)) throw new Error(`Template value missing: ${key}`);
    return String(values[key]);
  });
}

/** A value as it may stand in a header: control characters and line breaks become one space. */
// eslint-disable-next-line no-control-regex -- refusing control characters is the point of this pattern
const oneLine = (v: string | number) => String(v).replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]+/g, ' ');

export function renderEmail(name: string, values: Record<string, string | number>): { subject: string; text: string } {
  // The subject line is split off before filling, and filled with one-line values: a title holding a
  // line break (stored before such titles were refused) must not cut the subject short.
  const [first, ...rest] = templateText(`email/${name}.txt`).split('\n');
  if (!first.startsWith('Subject: ')) throw new Error(`E-mail template ${name} must start with "Subject: "`);
  const subject = fill(first.slice('Subject: '.length), Object.fromEntries(Object.entries(values).map(([k, v]) => [k, oneLine(v)])));
  return { subject: subject.trim(), text: fill(rest.join('\n'), values).replace(/^\n+/, '') };
}
