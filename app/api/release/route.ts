import { authorize, permit } from '@/lib/authz';
import { log } from '@/lib/log';
import { json, readJson, route } from '@/lib/http';
import { deliverSoon } from '@/lib/mail/outbox';
import { submissionScope } from '@/lib/authz/submission';
import { releaseMany, type ReleaseOutcome } from '@/lib/marking/release';
import { releaseSchema } from '@/lib/schemas/marking';

/**
 * Release one or a batch: { submissionIds }. Every submission must be one the caller may mark.
 * Answers { results, released } as JSON; a client that accepts application/x-ndjson instead gets
 * one line per released submission ({ done, total, submissionId, ok }) as it happens, then the
 * same { results, released } as the last line, so the release screen can show progress.
 */
export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'signed-in' });
  const { submissionIds } = await readJson(request, releaseSchema);
  for (const id of submissionIds) {
    const { scope } = await submissionScope(id);
    permit(actor, { kind: 'submission-mark', ...scope });
  }
  // Each group's e-mails are sent as soon as it commits, rather than at the worker's next tick
  // after the whole batch; failures stay queued and are retried.
  const logger = log();
  const afterCommit = () => void deliverSoon();
  const summary = (results: ReleaseOutcome[]) => ({ results, released: results.filter((r) => r.ok).length });

  if (!(request.headers.get('accept') ?? '').includes('application/x-ndjson')) {
    const results = await releaseMany(actor.id, submissionIds, { afterCommit });
    return json(summary(results));
  }
  const encoder = new TextEncoder();
  const stream = new ReadableStream<Uint8Array>({
    async start(controller) {
      const line = (v: unknown) => controller.enqueue(encoder.encode(`${JSON.stringify(v)}\n`));
      try {
        const results = await releaseMany(actor.id, submissionIds, {
          afterCommit,
          onProgress: (done, total, o) => line({ done, total, submissionId: o.submissionId, ok: o.ok }),
        });
        line(summary(results));
      } catch (error) {
        logger.error({ err: error }, 'release failed');
        line({
          error: `Something went wrong on our side while releasing; the submissions released so far stay released. The error has been logged (request id ${logger.bindings().requestId}).`,
        });
      }
      controller.close();
    },
  });
  return new Response(stream, {
    headers: { 'Content-Type': 'application/x-ndjson; charset=utf-8', 'Cache-Control': 'no-store', 'X-Content-Type-Options': 'nosniff' },
  });
});
