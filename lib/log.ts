/**
 * Structured server logs: one JSON object per line on stdout (pino), at the level LOG_LEVEL names
 * (trace, debug, info, warn, error, fatal or silent; default info).
 *
 * `log()` is the logger of the work under way: inside an API request (lib/http.ts `route`) it
 * carries that request's id, inside an outbox or storage-sweep run that run's id, and otherwise it
 * is the process's root logger. Errors go in as `{ err }` so pino writes their message and stack.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import { randomUUID } from 'node:crypto';
import pino, { type DestinationStream, type Logger } from 'pino';

export type { Logger };

let destination: DestinationStream | null = null;
let root: Logger | null = null;
const current = new AsyncLocalStorage<Logger>();

const LEVELS = ['trace', 'debug', 'info', 'warn', 'error', 'fatal', 'silent'];

function build(): Logger {
  const wanted = (process.env.LOG_LEVEL || 'info').trim().toLowerCase();
  const level = LEVELS.includes(wanted) ? wanted : 'info';
  const options = { level, base: { app: 'oscillab' }, timestamp: pino.stdTimeFunctions.isoTime };
  // Synchronous writes to stdout: a line is out before the process can exit or crash.
  const logger = pino(options, destination ?? pino.destination({ dest: 1, sync: true }));
  if (level !== wanted) logger.warn({ LOG_LEVEL: process.env.LOG_LEVEL }, `LOG_LEVEL is not one of ${LEVELS.join(', ')}; logging at info`);
  return logger;
}

/** The process's root logger. */
export function rootLogger(): Logger {
  return (root ??= build());
}

/** The logger of the request or run under way, or the root logger outside one. */
export function log(): Logger {
  return current.getStore() ?? rootLogger();
}

/** Runs `work` with `logger` as what `log()` returns inside it (and in everything it starts). */
export function withLogger<T>(logger: Logger, work: () => T): T {
  return current.run(logger, work);
}

/** A fresh id for a request or a background run. */
export function newRunId(): string {
  return randomUUID();
}

/**
 * Runs a background job (an outbox delivery, a storage sweep) under a logger of its own, whose
 * lines carry `run` (what kind of job) and `runId` (and the request id, when a request started it).
 */
export function withRun<T>(run: string, work: (logger: Logger) => Promise<T>): Promise<T> {
  const logger = log().child({ run, runId: newRunId() });
  return withLogger(logger, () => work(logger));
}

/** For tests: send every log line to `stream` instead of stdout (null: back to stdout). */
export function setLogDestination(stream: DestinationStream | null): void {
  destination = stream;
  root = null;
}
