/**
 * Rebuild the kept statistics from the check results: `npm run stats:rebuild [-- --practical 12 …] [-- --check]`.
 *
 * The app keeps them up to date by itself whenever a change goes through the models; run this
 * after changing rows behind their back (raw SQL, a bulk re-check done outside the app, a restored
 * backup, a removed user whose submissions went by ON DELETE CASCADE). With --check it also says
 * whether the kept rows were already right (they should be) before replacing them.
 * Uses DATABASE_URL like the app; writers wait while it runs (one transaction).
 */
import { closeDatabase } from '@/lib/db';
import { keptSnapshot, rebuildStatistics } from '@/lib/statistics/keep';

async function main() {
  const args = process.argv.slice(2);
  const check = args.includes('--check');
  const practicalIds: number[] = [];
  for (let i = 0; i < args.length; i++) if (args[i] === '--practical') practicalIds.push(Number(args[++i]));
  if (practicalIds.some((p) => !Number.isInteger(p) || p <= 0))
    throw new Error('--practical takes a practical id (a positive whole number)');
  const only = practicalIds.length ? practicalIds : undefined;
  const before = check ? await keptSnapshot(only) : null;
  const start = performance.now();
  const result = await rebuildStatistics({
    practicalIds: only,
    onProgress: (done, total) => process.stdout.write(`\r  ${done} of ${total} students…`),
  });
  process.stdout.write('\n');
  console.log(
    `Kept statistics rebuilt${only ? ` for practical(s) ${only.join(', ')}` : ''}: ${result.submissions} counted submissions of ${result.students} students in ${((performance.now() - start) / 1000).toFixed(1)} s.`,
  );
  if (before) {
    const after = await keptSnapshot(only);
    const differing = Object.keys(after).filter((t) => JSON.stringify(after[t]) !== JSON.stringify(before[t]));
    console.log(
      differing.length
        ? `The kept rows had drifted in: ${differing.join(', ')} (now rebuilt).`
        : 'The kept rows were already equal to the rebuilt ones.',
    );
    if (differing.length) process.exitCode = 3;
  }
  await closeDatabase();
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
