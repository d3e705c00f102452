// Development and test entry of the upload reader's worker thread (lib/spectrum/worker.ts): runs
// upload-worker.ts from source through tsx, a development dependency. A production server runs the
// compiled copy `npm run build` writes into the build folder instead (scripts/build-worker.mjs).
let tsImport;
try {
  ({ tsImport } = await import('tsx/esm/api'));
} catch {
  throw new Error(
    'The upload reader is not compiled and tsx (a development dependency) is not installed: run `npm run build`, which compiles it into the build folder.',
  );
}
await tsImport('./upload-worker.ts', import.meta.url);
