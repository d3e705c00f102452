#!/usr/bin/env node
/**
 * Part of `npm run build` (after `next build`): compiles the upload reader's worker thread
 * (lib/spectrum/upload-worker.ts and everything it imports) into one plain JavaScript file in the
 * build folder, so a production server starts it with Node alone — no TypeScript loader at run
 * time, and no tsx in a production install. lib/spectrum/worker.ts runs this file under
 * `next start`; in development and tests it runs the sources through tsx instead.
 * Usage: node scripts/build-worker.mjs   (NEXT_DIST_DIR picks the build folder, as for next build)
 */
import path from 'node:path';
import { build } from 'esbuild';

const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..');
const distDir = path.resolve(root, process.env.NEXT_DIST_DIR || '.next');
const outfile = path.join(distDir, 'oscillab', 'upload-worker.mjs');

await build({
  entryPoints: [path.join(root, 'lib', 'spectrum', 'upload-worker.ts')],
  outfile,
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  // Self-contained (the readers' few small libraries included), so it runs wherever the build folder is.
  packages: 'bundle',
  tsconfig: path.join(root, 'tsconfig.json'),
  // `server-only` throws outside Next's server build: here it is the package's empty module (DEVELOPERS.md).
  alias: { 'server-only': path.join(root, 'node_modules', 'server-only', 'empty.js') },
  legalComments: 'inline',
  logLevel: 'warning',
});
console.log(`upload worker compiled to ${path.relative(process.cwd(), outfile)}`);
