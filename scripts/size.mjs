#!/usr/bin/env node
/**
 * `npm run size`: first-load JavaScript per page route of the last production build (`next build`),
 * gzipped as the server sends it. A route's first load is the framework's root chunks plus every
 * chunk its layouts and page list in the build's client reference manifest (what the browser
 * fetches before the page is interactive; chunks loaded later on demand are not counted).
 *
 * The shared part — what every route loads, the root layout included — must stay under the budget
 * (SIZE_BUDGET_KIB, default 140 KiB gzipped); the script exits 1 when it does not.
 * Usage: node scripts/size.mjs [--json]   (NEXT_DIST_DIR picks the build folder, as for next build)
 */
import fs from 'node:fs';
import path from 'node:path';
import vm from 'node:vm';
import zlib from 'node:zlib';

const distDir = path.resolve(process.env.NEXT_DIST_DIR || '.next');
const budgetKiB = Number(process.env.SIZE_BUDGET_KIB || 140);
const manifestPath = path.join(distDir, 'build-manifest.json');
if (!fs.existsSync(manifestPath)) {
  console.error(`No production build in ${path.relative(process.cwd(), distDir) || '.'}/: run \`npm run build\` first.`);
  process.exit(1);
}

const rootMainFiles = JSON.parse(fs.readFileSync(manifestPath, 'utf8')).rootMainFiles ?? [];

/** Every page_client-reference-manifest.js under server/app, read as the server reads it. */
function clientManifests() {
  const base = path.join(distDir, 'server', 'app');
  const out = [];
  for (const rel of fs.readdirSync(base, { recursive: true })) {
    if (!String(rel).endsWith('page_client-reference-manifest.js')) continue;
    const sandbox = {};
    vm.runInNewContext(fs.readFileSync(path.join(base, rel), 'utf8'), sandbox);
    for (const [key, manifest] of Object.entries(sandbox.__RSC_MANIFEST ?? {})) out.push({ key, manifest });
  }
  return out;
}

const sizes = new Map();
function sizeOf(file) {
  if (!sizes.has(file)) {
    const bytes = fs.readFileSync(path.join(distDir, file.replace(/^\/?_next\//, '')));
    sizes.set(file, { raw: bytes.length, gzip: zlib.gzipSync(bytes, { level: 9 }).length });
  }
  return sizes.get(file);
}

const routes = clientManifests()
  .filter(({ key }) => key.endsWith('/page') && !key.startsWith('/_global-error'))
  .map(({ key, manifest }) => {
    const files = [...new Set([...rootMainFiles, ...Object.values(manifest.entryJSFiles ?? {}).flat()])];
    return { route: key.replace(/\/page$/, '') || '/', files };
  })
  .sort((a, b) => a.route.localeCompare(b.route));

const shared = routes.length ? routes.map((r) => r.files).reduce((a, b) => a.filter((f) => b.includes(f))) : [];
const total = (files) => files.reduce((t, f) => ({ raw: t.raw + sizeOf(f).raw, gzip: t.gzip + sizeOf(f).gzip }), { raw: 0, gzip: 0 });
const kib = (n) => (n / 1024).toFixed(1);

const rows = routes.map((r) => ({ route: r.route, ...total(r.files), own: total(r.files.filter((f) => !shared.includes(f))).gzip }));
const sharedSize = total(shared);

if (process.argv.includes('--json')) {
  console.log(JSON.stringify({ sharedGzip: sharedSize.gzip, routes: rows }, null, 2));
} else {
  const width = Math.max(5, ...rows.map((r) => r.route.length));
  console.log(`First-load JS per route (${path.relative(process.cwd(), distDir) || '.'}/), KiB`);
  console.log(`${'route'.padEnd(width)}  ${'gzip'.padStart(7)}  ${'own gzip'.padStart(8)}  ${'raw'.padStart(7)}`);
  for (const r of rows)
    console.log(`${r.route.padEnd(width)}  ${kib(r.gzip).padStart(7)}  ${kib(r.own).padStart(8)}  ${kib(r.raw).padStart(7)}`);
  console.log(
    `${'shared by every route'.padEnd(width)}  ${kib(sharedSize.gzip).padStart(7)}  ${''.padStart(8)}  ${kib(sharedSize.raw).padStart(7)}`,
  );
}

if (sharedSize.gzip > budgetKiB * 1024) {
  console.error(`The JS every route loads is ${kib(sharedSize.gzip)} KiB gzipped, over the budget of ${budgetKiB} KiB (SIZE_BUDGET_KIB).`);
  process.exit(1);
}
