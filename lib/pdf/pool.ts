/**
 * Feedback PDFs rendered on every core: a small pool of worker threads (render-worker.ts), started
 * when a batch needs them and stopped after a quiet half minute. PDF_WORKERS sets their number
 * (default: the machine's available parallelism; 0 renders in this thread). Small batches, and
 * any job whose thread fails, are rendered here instead, so a release never depends on a thread.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { buildFeedbackPdf, type FeedbackInput } from './feedback';
import { log } from '@/lib/log';

const IDLE_MS = 30_000;

export function pdfWorkerCount(): number {
  const configured = process.env.PDF_WORKERS;
  if (configured !== undefined && configured !== '') return Math.max(0, Math.floor(Number(configured)) || 0);
  return Math.max(1, typeof os.availableParallelism === 'function' ? os.availableParallelism() : os.cpus().length);
}

type Job = { id: number; input: FeedbackInput; resolve: (pdf: Uint8Array) => void; reject: (e: Error) => void };
type Slot = { worker: Worker; ready: Promise<void>; job: Job | null };

class RenderPool {
  private slots: Slot[] = [];
  private queue: Job[] = [];
  private nextId = 1;
  private idle: NodeJS.Timeout | null = null;
  private broken = false;

  constructor(private readonly size: number) {}

  render(input: FeedbackInput): Promise<Uint8Array> {
    if (this.broken) return buildFeedbackPdf(input);
    return new Promise((resolve, reject) => {
      this.queue.push({ id: this.nextId++, input, resolve, reject });
      if (this.idle) clearTimeout(this.idle);
      this.idle = null;
      this.pump();
    });
  }

  private spawn(): Slot | null {
    const entry = path.join(/*turbopackIgnore: true*/ process.cwd(), 'lib', 'pdf', 'render-worker.cjs');
    if (!fs.existsSync(entry)) {
      this.broken = true;
      return null;
    }
    const worker = new Worker(entry, { env: process.env as Record<string, string> });
    worker.unref();
    let markReady: () => void = () => undefined;
    const slot: Slot = { worker, job: null, ready: new Promise<void>((r) => (markReady = r)) };
    worker.on('message', (m: { ready?: true; id?: number; pdf?: Uint8Array; error?: string }) => {
      if (m.ready) return markReady();
      const job = slot.job;
      slot.job = null;
      if (job && m.id === job.id) {
        if (m.pdf) job.resolve(m.pdf);
        else job.reject(new Error(m.error ?? 'PDF rendering failed'));
      }
      this.pump();
    });
    const lost = (error: Error) => {
      this.slots = this.slots.filter((s) => s !== slot);
      markReady();
      const job = slot.job;
      slot.job = null;
      // Render the lost job here rather than fail the release.
      if (job) buildFeedbackPdf(job.input).then(job.resolve, job.reject);
      if (!this.slots.length && this.queue.length) {
        this.broken = true;
        this.drainHere();
      }
      log().error({ err: error }, 'PDF worker stopped');
    };
    worker.on('error', lost);
    worker.on('exit', (code) => {
      if (this.slots.includes(slot)) lost(new Error(`exited with code ${code}`));
    });
    this.slots.push(slot);
    return slot;
  }

  private drainHere() {
    for (const job of this.queue.splice(0)) buildFeedbackPdf(job.input).then(job.resolve, job.reject);
  }

  private pump() {
    while (this.queue.length) {
      let slot = this.slots.find((s) => !s.job);
      if (!slot && this.slots.length < this.size) slot = this.spawn() ?? undefined;
      if (!slot) {
        if (this.broken) this.drainHere();
        return;
      }
      const job = this.queue.shift()!;
      slot.job = job;
      const s = slot;
      void s.ready.then(() => {
        if (this.slots.includes(s)) s.worker.postMessage({ id: job.id, input: job.input });
      });
    }
    if (!this.slots.some((s) => s.job) && !this.idle) {
      this.idle = setTimeout(() => this.stop(), IDLE_MS);
      this.idle.unref();
    }
  }

  async stop() {
    const slots = this.slots.splice(0);
    await Promise.all(slots.map((s) => s.worker.terminate()));
  }
}

let pool: RenderPool | null = null;

/** Render one feedback PDF: in a worker thread when the batch is large enough to be worth them. */
export function renderFeedbackPdf(input: FeedbackInput, batchSize = 1): Promise<Uint8Array> {
  const workers = pdfWorkerCount();
  if (workers === 0 || batchSize < 4) return buildFeedbackPdf(input);
  pool ??= new RenderPool(workers);
  return pool.render(input);
}

/** Stop the threads now (benchmarks and tests; the app lets them stop when idle). */
export async function stopPdfWorkers(): Promise<void> {
  const p = pool;
  pool = null;
  await p?.stop();
}
