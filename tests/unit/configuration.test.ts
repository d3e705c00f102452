/**
 * The configuration a department sets is listed once for people (README, "Configuration") and once
 * as a file to copy (.env.example). Both must name every variable the app reads, and each other's.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = path.resolve(__dirname, '../..');
const read = (f: string) => fs.readFileSync(path.join(ROOT, f), 'utf8');
/** Set by Node or Next themselves, not by whoever runs the app. */
const NOT_CONFIGURATION = new Set(['NODE_ENV', 'NEXT_RUNTIME']);

function readmeVariables(): string[] {
  const readme = read('README.md');
  const section = readme.slice(readme.indexOf('## Configuration'), readme.indexOf('\n## ', readme.indexOf('## Configuration') + 5));
  const names = section
    .split('\n')
    .filter((l) => l.startsWith('| `'))
    .flatMap((l) => [...l.split('|')[1].matchAll(/`([A-Z][A-Z0-9_]+)`/g)].map((m) => m[1]));
  return [...new Set(names)].sort();
}

function exampleVariables(): string[] {
  return [...new Set([...read('.env.example').matchAll(/^#? ?([A-Z][A-Z0-9_]+)=/gm)].map((m) => m[1]))].sort();
}

/** Every process.env.NAME read by the app and the scripts a production install runs. */
function variablesReadByTheApp(): string[] {
  const files: string[] = [
    'instrumentation.ts',
    'proxy.ts',
    'next.config.mjs',
    'scripts/db-backup.mjs',
    'scripts/db-restore.mjs',
    'scripts/recheck.ts',
  ];
  for (const dir of ['app', 'lib', 'components', 'models', 'templates']) {
    for (const f of fs.readdirSync(path.join(ROOT, dir), { recursive: true }) as string[]) {
      if (/\.(ts|tsx|mjs|cjs|js)$/.test(f)) files.push(path.join(dir, f));
    }
  }
  const names = new Set<string>();
  for (const f of files) for (const m of read(f).matchAll(/process\.env\.([A-Z][A-Z0-9_]+)/g)) names.add(m[1]);
  // `npm start` passes these to next start.
  for (const m of (JSON.parse(read('package.json')).scripts.start as string).matchAll(/\$\{([A-Z_]+)/g)) names.add(m[1]);
  return [...names].filter((n) => !NOT_CONFIGURATION.has(n)).sort();
}

describe('configuration', () => {
  it('the README table lists every variable the app reads', () => {
    const listed = readmeVariables();
    expect(variablesReadByTheApp().filter((n) => !listed.includes(n))).toEqual([]);
  });

  it('.env.example holds exactly the variables of the README table', () => {
    expect(exampleVariables()).toEqual(readmeVariables());
  });
});
