/**
 * Runs once when the server starts: forwarding headers are guarded (lib/client-address.ts), the
 * outbox workers resume any mail and scores left queued, files left without a row are swept, and
 * the kept statistics are built if a migration asked for it.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  // First: forwarding headers a client wrote itself are dropped before any request is handled.
  const { guardForwardedHeaders } = await import('./lib/client-address');
  await guardForwardedHeaders();
  if (process.env.STORAGE_SWEEP !== 'off') {
    const { startStorageSweeper } = await import('./lib/storage-sweep');
    startStorageSweeper();
  }
  // Build the kept statistics now if a migration left them to be built, not on the first page view.
  const { ensureKeptStatistics } = await import('./lib/statistics/keep');
  const { log } = await import('./lib/log');
  ensureKeptStatistics().catch((error) => log().error({ err: error }, 'building the kept statistics failed'));
  if (process.env.OUTBOX_WORKER === 'off') return;
  const { startOutboxWorker } = await import('./lib/mail/outbox');
  startOutboxWorker(Number(process.env.OUTBOX_INTERVAL_MS || 3000));
  // Scores for a connected learning platform's gradebook go out the same way (lib/lti/scores.ts).
  const { startScoreWorker } = await import('./lib/lti/scores');
  startScoreWorker(Number(process.env.OUTBOX_INTERVAL_MS || 3000));
}
