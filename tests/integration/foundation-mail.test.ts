import { describe, expect, it } from 'vitest';
import { sendMail } from '@/lib/mail/transport';
import { deliverOutbox, deliverSoon, outboxMessageId, queueEmail, queueEmails } from '@/lib/mail/outbox';
import { renderEmail } from '@/lib/templates';
import { models } from '@/models';
import { mailTo, waitForMail } from '../helpers/maildev';

describe('mail module', () => {
  it('delivers a message to the local mail catcher', async () => {
    const to = `mail-${Date.now()}@test.example`;
    await sendMail({ to, subject: 'Oscillab mail check', text: 'Band centre 2885.9 cm⁻¹' });
    const [mail] = await waitForMail(to);
    expect(mail.subject).toBe('Oscillab mail check');
    expect(mail.text).toContain('2885.9 cm⁻¹');
  });

  it('sends each outbox row exactly once, even when the worker runs twice at once', async () => {
    const to = `outbox-${Date.now()}@test.example`;
    const { subject, text } = renderEmail('test-message', { name: 'Test person' });
    await queueEmail({ dedupeKey: `test:${to}`, to, subject, text });
    await queueEmail({ dedupeKey: `test:${to}`, to, subject, text }); // the same logical message again
    const [a, b] = await Promise.all([deliverOutbox(), deliverOutbox()]);
    expect(a.sent + b.sent).toBe(1);
    await new Promise((r) => setTimeout(r, 300));
    expect(await mailTo(to)).toHaveLength(1);
    const row = await models().EmailOutbox.findOne({ where: { dedupeKey: `test:${to}` } });
    expect(row!.status).toBe('sent');
    expect(row!.messageId).toBeTruthy();
  });

  it('a message sent again after its sender died (lease expired) carries the same Message-ID, so the mailbox shows one', async () => {
    const to = `repeat-${Date.now()}@test.example`;
    await queueEmail({ dedupeKey: `repeat:${to}`, to, subject: 'Sent twice by a dying worker', text: 'x' });
    expect((await deliverOutbox()).sent).toBeGreaterThanOrEqual(1);
    const row = (await models().EmailOutbox.findOne({ where: { dedupeKey: `repeat:${to}` } }))!;
    // What a worker killed between the relay's "250 OK" and its own UPDATE leaves behind.
    await models().EmailOutbox.update(
      { status: 'sending', sentAt: null, lockedUntil: new Date(Date.now() - 1000) },
      { where: { id: row.id } },
    );
    expect((await deliverOutbox()).sent).toBeGreaterThanOrEqual(1);
    const copies = await waitForMail(to, 2);
    expect(copies).toHaveLength(2);
    const ids = copies.map((m) => m.headers['message-id']);
    expect(ids[0]).toBe(outboxMessageId(row));
    expect(ids[1]).toBe(ids[0]);
    expect((await models().EmailOutbox.findByPk(row.id))!.messageId).toBe(outboxMessageId(row));
    // A different row (another message) has another Message-ID.
    const other = { id: row.id + 1, createdAt: row.createdAt };
    expect(outboxMessageId(other)).not.toBe(outboxMessageId(row));
  });

  it('keeps mail queued with back-off while SMTP is down, and sends it later', async () => {
    const to = `down-${Date.now()}@test.example`;
    const saved = process.env.SMTP_URL;
    process.env.SMTP_URL = 'smtp://127.0.0.1:9'; // nothing listens there
    await queueEmail({ dedupeKey: `down:${to}`, to, subject: 'Queued while down', text: 'x' });
    const down = await deliverOutbox();
    expect(down.failed).toBeGreaterThanOrEqual(1);
    const row = await models().EmailOutbox.findOne({ where: { dedupeKey: `down:${to}` } });
    expect(row!.status).toBe('queued');
    expect(row!.nextAttemptAt.getTime()).toBeGreaterThan(Date.now());
    process.env.SMTP_URL = saved;
    const later = await deliverOutbox({ now: () => new Date(Date.now() + 60 * 60_000) });
    expect(later.sent).toBeGreaterThanOrEqual(1);
    expect(await waitForMail(to)).toHaveLength(1);
  });

  it('queues a group of messages in one go, leaving out a dedupe key already queued or repeated in the group', async () => {
    const to = `group-${Date.now()}@test.example`;
    await queueEmail({ dedupeKey: `group:${to}:1`, to, subject: 'First', text: 'x' });
    await queueEmails([
      { dedupeKey: `group:${to}:1`, to, subject: 'First again', text: 'x' },
      { dedupeKey: `group:${to}:2`, to, subject: 'Second', text: 'x' },
      { dedupeKey: `group:${to}:2`, to, subject: 'Second again', text: 'x' },
      { dedupeKey: `group:${to}:3`, to, subject: 'Third\r\nBcc: someone@else.example', text: 'x' },
    ]);
    const rows = await models().EmailOutbox.findAll({ where: { toAddress: to }, order: [['dedupeKey', 'ASC']] });
    expect(rows.map((r) => [r.dedupeKey.split(':').pop(), r.subject])).toEqual([
      ['1', 'First'],
      ['2', 'Second'],
      ['3', 'Third Bcc: someone@else.example'],
    ]);
    expect(rows.every((r) => r.status === 'queued' && r.attempts === 0)).toBe(true);
  });

  it('deliverSoon: runs asked for while one is under way become one more run, which sends what was queued meanwhile, each once', async () => {
    const to = `soon-${Date.now()}@test.example`;
    await queueEmails([1, 2, 3].map((n) => ({ dedupeKey: `soon:${to}:${n}`, to, subject: `Soon ${n}`, text: 'x' })));
    const first = deliverSoon();
    // Asked again at once, and again after more mail is queued, while the first run is sending.
    const again = [deliverSoon(), deliverSoon()];
    await queueEmails([4, 5].map((n) => ({ dedupeKey: `soon:${to}:${n}`, to, subject: `Soon ${n}`, text: 'x' })));
    again.push(deliverSoon());
    await Promise.all([first, ...again]);
    const rows = await models().EmailOutbox.findAll({ where: { toAddress: to } });
    expect(rows.map((r) => r.status)).toEqual(['sent', 'sent', 'sent', 'sent', 'sent']);
    expect(rows.every((r) => r.attempts === 1 && r.messageId === outboxMessageId(r))).toBe(true);
    const mails = await waitForMail(to, 5);
    expect(mails.map((m) => m.subject).sort()).toEqual(['Soon 1', 'Soon 2', 'Soon 3', 'Soon 4', 'Soon 5']);
  });
});
