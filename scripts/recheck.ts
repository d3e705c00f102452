/**
 * `npm run db:recheck`: re-check every submitted attempt with the grading engine in use, after an
 * upgrade that changed how numbers are judged. Awarded marks and comments are kept; verdicts,
 * named slips, flags and proposed marks are replaced. Safe to run while the app runs (each
 * submission is re-checked in its own transaction) and to run again.
 */
import { recheckAll } from '../lib/submissions/recheck';
import { closeDatabase } from '../lib/db';

async function main() {
  const started = Date.now();
  let last = 0;
  const result = await recheckAll((done, total) => {
    if (done === total || Date.now() - last > 2000) {
      last = Date.now();
      console.log(`re-checked ${done} of ${total}`);
    }
  });
  for (const f of result.failed) console.error(`submission ${f.id}: ${f.message}`);
  console.log(
    `${result.rechecked} submissions re-checked in ${((Date.now() - started) / 1000).toFixed(1)} s${result.failed.length ? `; ${result.failed.length} failed` : ''}.`,
  );
  await closeDatabase();
  if (result.failed.length) process.exit(1);
}

main().catch(async (error) => {
  console.error(error);
  await closeDatabase();
  process.exit(1);
});
