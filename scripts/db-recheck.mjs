#!/usr/bin/env node
/**
 * `npm run db:recheck`: compiles scripts/recheck.ts, with what it imports from lib/ and models/,
 * into one CommonJS file (esbuild, which `npm run build` also uses for the upload worker; packages
 * stay in node_modules) and runs it. Compiled afresh every time, so it always runs the grading
 * engine of the sources as they are, and it needs no TypeScript loader: tsx is a development
 * dependency, and this runs in a production install.
 */
import { createRequire } from 'node:module';
import path from 'node:path';
import { build } from 'esbuild';

const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..');
const outfile = path.join(root, 'node_modules', '.cache', 'oscillab', 'recheck.cjs');

await build({
  entryPoints: [path.join(root, 'scripts', 'recheck.ts')],
  outfile,
  bundle: true,
  platform: 'node',
  format: 'cjs',
  target: 'node20',
  packages: 'external',
  tsconfig: path.join(root, 'tsconfig.json'),
  // `server-only` throws outside Next's server build: here it is the package's empty module (DEVELOPERS.md).
  alias: { 'server-only': path.join(root, 'node_modules', 'server-only', 'empty.js') },
  sourcemap: 'inline',
  logLevel: 'warning',
});
process.setSourceMapsEnabled(true);
createRequire(import.meta.url)(outfile);
