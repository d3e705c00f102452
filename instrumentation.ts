/** Runs once when the server starts: forwarding headers are guarded (lib/client-address.ts), the outbox workers resume any mail and scores left queued, and files left without a row are swept. */
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  // First: forwarding headers a client wrote itself are dropped before any request is handled.
  const { guardForwardedHeaders } = await import('./lib/client-address');
  await guardForwardedHeaders();
  if (process.env.STORAGE_SWEEP !== 'off') {
    const { startStorageSweeper } = await import('./lib/storage-sweep');
    startStorageSweeper();
  }
  if (process.env.OUTBOX_WORKER === 'off') return;
  const { startOutboxWorker } = await import('./lib/mail/outbox');
  startOutboxWorker(Number(process.env.OUTBOX_INTERVAL_MS || 3000));
  // Scores for a connected learning platform's gradebook go out the same way (lib/lti/scores.ts).
  const { startScoreWorker } = await import('./lib/lti/scores');
  startScoreWorker(Number(process.env.OUTBOX_INTERVAL_MS || 3000));
}
