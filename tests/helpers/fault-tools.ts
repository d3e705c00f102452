/**
 * Tools for the concurrency and fault tests: a mail catcher this file starts and stops itself,
 * an SMTP relay that stalls on purpose, a second SQLite connection that holds the write lock,
 * and waiting for the release routes' background deliveries to settle.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';
import { Op } from 'sequelize';
import { models } from '@/models';

export type Catcher = { smtp: number; web: number; stop: () => Promise<void> };

async function answers(url: string): Promise<boolean> {
  try {
    return (await fetch(url)).ok;
  } catch {
    return false;
  }
}

export async function waitUntil(what: string, test: () => Promise<boolean> | boolean, ms = 20_000, every = 100): Promise<void> {
  const end = Date.now() + ms;
  for (;;) {
    if (await test()) return;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, every));
  }
}

/**
 * Start scripts/maildev.mjs on the given ports (or reuse one already listening there, which
 * is then left running) and point SMTP_URL / MAILDEV_API at it.
 */
export async function startCatcher(smtp: number, web: number): Promise<Catcher> {
  process.env.MAILDEV_API = `http://127.0.0.1:${web}`;
  process.env.SMTP_URL = `smtp://127.0.0.1:${smtp}`;
  const api = `http://127.0.0.1:${web}/api/email`;
  let child: ChildProcess | null = null;
  if (!(await answers(api))) {
    const started = spawn(process.execPath, [path.resolve('scripts/maildev.mjs'), String(smtp), String(web)], { stdio: 'ignore' });
    child = started;
    // Never outlive the test process, even if its afterAll hook times out.
    process.once('exit', () => started.kill('SIGTERM'));
    await waitUntil(`mail catcher on ${web}`, () => answers(api));
  }
  await clearMail();
  return {
    smtp,
    web,
    stop: async () => {
      if (!child || child.exitCode !== null) return;
      const exited = new Promise((r) => child!.once('exit', r));
      child.kill('SIGTERM');
      await exited;
    },
  };
}

export async function clearMail(): Promise<void> {
  await fetch(`${process.env.MAILDEV_API}/api/email/all`, { method: 'DELETE' });
}

/** Wait until no row is being sent and every queued row has had its first delivery attempt. */
export async function waitForOutboxIdle(ms = 30_000): Promise<void> {
  const { EmailOutbox } = models();
  await waitUntil(
    'the outbox to settle',
    async () => (await EmailOutbox.count({ where: { [Op.or]: [{ status: 'sending' }, { status: 'queued', attempts: 0 }] } })) === 0,
    ms,
    150,
  );
}

/** A port nothing listens on (bound, read, released). */
export async function closedPort(): Promise<number> {
  const server = net.createServer();
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  const port = (server.address() as net.AddressInfo).port;
  await new Promise((r) => server.close(r));
  return port;
}

/**
 * An SMTP relay to the catcher that passes the first `passFirst` messages and holds every later
 * one at its DATA command (nothing more of it reaches the catcher, no answer comes back), so a
 * sender is stuck mid-delivery with its outbox row in 'sending'. Counted by message, not by
 * connection: the app's SMTP transport is pooled and sends many messages over one connection.
 */
export async function stallingRelay(upstreamPort: number, passFirst: number) {
  let messages = 0;
  const sockets = new Set<net.Socket>();
  let onStall: (() => void) | null = null;
  const stalled = new Promise<void>((r) => (onStall = r));
  const server = net.createServer((client) => {
    sockets.add(client);
    client.on('error', () => undefined);
    client.on('close', () => sockets.delete(client));
    const up = net.connect(upstreamPort, '127.0.0.1');
    up.on('error', () => client.destroy());
    sockets.add(up);
    up.pipe(client);
    let held = false;
    let line = '';
    client.on('data', (chunk: Buffer) => {
      if (held) return;
      // Forward line by line while looking for the DATA command of each message.
      const text = line + chunk.toString('latin1');
      const parts = text.split('\r\n');
      line = parts.pop() ?? '';
      let forward = '';
      for (const part of parts) {
        if (/^DATA$/i.test(part) && ++messages > passFirst) {
          held = true;
          if (forward) up.write(Buffer.from(forward, 'latin1'));
          onStall?.();
          return;
        }
        forward += `${part}\r\n`;
      }
      if (forward) up.write(Buffer.from(forward, 'latin1'));
    });
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  return {
    port: (server.address() as net.AddressInfo).port,
    messages: () => messages,
    stalled,
    close: async () => {
      for (const s of sockets) s.destroy();
      await new Promise((r) => server.close(r));
    },
  };
}

/**
 * Hold SQLite's write lock from a second connection (as another process would) for `ms`:
 * BEGIN IMMEDIATE, a write, then COMMIT. Resolves once the lock is held; `released` settles at COMMIT.
 */
export async function holdWriteLock(file: string, ms: number): Promise<{ released: Promise<void>; heldAt: number }> {
  // eslint-disable-next-line @typescript-eslint/no-require-imports -- loaded only when a fault test needs the raw driver
  const sqlite3 = require('sqlite3') as typeof import('sqlite3');
  const db = new sqlite3.Database(file);
  const exec = (sql: string) => new Promise<void>((resolve, reject) => db.exec(sql, (err) => (err ? reject(err) : resolve())));
  await exec('PRAGMA busy_timeout = 5000; BEGIN IMMEDIATE; UPDATE users SET name = name WHERE id = (SELECT MIN(id) FROM users);');
  const heldAt = Date.now();
  const released = new Promise<void>((resolve, reject) => {
    setTimeout(() => {
      exec('COMMIT')
        .then(() => new Promise<void>((r) => db.close(() => r())))
        .then(resolve, reject);
    }, ms);
  });
  return { released, heldAt };
}

export function sqliteFile(): string {
  const url = process.env.DATABASE_URL ?? '';
  if (!url.startsWith('sqlite:')) throw new Error('not a SQLite database');
  return url.slice('sqlite:'.length);
}
