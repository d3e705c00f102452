/**
 * A PDF rendering thread: receives { id, input } (a FeedbackInput), answers { id, pdf } with the
 * bytes transferred, or { id, error }. Fonts are prepared once per thread (fonts.ts).
 */
import { parentPort } from 'node:worker_threads';
import { buildFeedbackPdf, type FeedbackInput } from './feedback';

parentPort!.on('message', async (message: { id: number; input: FeedbackInput }) => {
  try {
    const pdf = await buildFeedbackPdf(message.input);
    const bytes = new Uint8Array(pdf);
    parentPort!.postMessage({ id: message.id, pdf: bytes }, [bytes.buffer]);
  } catch (error) {
    parentPort!.postMessage({ id: message.id, error: error instanceof Error ? error.message : String(error) });
  }
});
parentPort!.postMessage({ ready: true });
