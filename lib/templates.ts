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

export function renderEmail(name: string, values: Record<string, string | number>): { subject: string; text: string } {
  const filled = fill(templateText(`email/${name}.txt`), values);
  const [first, ...rest] = filled.split('\n');
  if (!first.startsWith('Subject: ')) throw new Error(`E-mail template ${name} must start with "Subject: "`);
  return { subject: first.slice('Subject: '.length).trim(), text: rest.join('\n').replace(/^\n+/, '') };
}
