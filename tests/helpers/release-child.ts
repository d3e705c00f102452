/**
 * A stand-in for the app process in the "killed mid-release" fault test, run as
 * `node --conditions=react-server --import tsx tests/helpers/release-child.ts <actorId> <id,id,…>` with the test's
 * DATABASE_URL, UPLOAD_DIR, NEXTAUTH_SECRET and SMTP_URL. It does what the server does: the real
 * release route (release the batch, then start delivery), then keeps the outbox worker going
 * until nothing is left. The test SIGKILLs it part-way; nothing here cleans up on purpose.
 */
import { apiRequest } from './session';
import { POST as releaseRoute } from '@/app/api/release/route';
import { deliverOutbox } from '@/lib/mail/outbox';

async function main() {
  const [actor, list] = process.argv.slice(2);
  const submissionIds = list.split(',').map(Number);
  console.log('ready');
  const res = await releaseRoute(await apiRequest('/api/release', { as: Number(actor), body: { submissionIds } }), {});
  console.log('released', res.status, JSON.stringify(await res.json()));
  for (;;) {
    const report = await deliverOutbox();
    console.log('delivered', JSON.stringify(report));
    if (report.remaining === 0) break;
    await new Promise((r) => setTimeout(r, 200));
  }
  console.log('done');
  process.exit(0);
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
