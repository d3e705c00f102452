/**
 * Runs once when the server starts: the outbox worker resumes any mail left queued, files left
 * without a row are swept, and the kept statistics are built if a migration asked for it.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  if (process.env.STORAGE_SWEEP !== 'off') {
    const { startStorageSweeper } = await import('./lib/storage-sweep');
    startStorageSweeper();
  }
  // Build the kept statistics now if a migration left them to be built, not on the first page view.
  const { ensureKeptStatistics } = await import('./lib/statistics/keep');
  ensureKeptStatistics().catch((error) => console.error('[oscillab] kept statistics', error));
  if (process.env.OUTBOX_WORKER === 'off') return;
  const { startOutboxWorker } = await import('./lib/mail/outbox');
  startOutboxWorker(Number(process.env.OUTBOX_INTERVAL_MS || 3000));
}
