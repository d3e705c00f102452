/**
 * The site administrator's page, through its route handlers and reads: granting and removing a
 * course role, the outbox's health with a retry of a failed message (which then reaches the mail
 * catcher), and the audit log with its filters. Everyone else is refused and nothing changes.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params } from '../helpers/session';
import { buildWorld, type World } from '../helpers/world';
import { mailTo } from '../helpers/maildev';
import * as grant from '@/app/api/admin/memberships/route';
import * as removeRole from '@/app/api/admin/memberships/[membershipId]/route';
import * as retry from '@/app/api/admin/outbox/[id]/retry/route';
import { searchPeople } from '@/lib/admin/people';
import { outboxHealth } from '@/lib/admin/outbox-health';
import { auditLog, auditQuery } from '@/lib/admin/audit-log';
import { models } from '@/models';

let w: World;
beforeAll(async () => {
  w = await buildWorld();
});

describe('course roles', () => {
  it('the administrator grants a TA role, finds it in the people list, and removes it', async () => {
    const who = w.people.nobody;
    const res = await grant.POST(
      await apiRequest('/api/admin/memberships', { as: w.people.admin.id, body: { email: who.email, courseId: w.course.id, role: 'ta' } }),
      params({}),
    );
    expect(res.status).toBe(201);
    const { membership } = await res.json();
    const found = await searchPeople({ q: who.email });
    expect(found.people).toHaveLength(1);
    expect(found.people[0].roles).toEqual([
      expect.objectContaining({ membershipId: membership.id, course: w.course.code, role: 'ta', cohort: null }),
    ]);

    const del = await removeRole.DELETE(
      await apiRequest(`/api/admin/memberships/${membership.id}`, { as: w.people.admin.id, method: 'DELETE' }),
      params({ membershipId: String(membership.id) }),
    );
    expect(del.status).toBe(200);
    expect(await models().CourseMembership.findByPk(membership.id)).toBeNull();
    const log = await auditLog(auditQuery.parse({ action: 'membership.remove' }));
    expect(log.rows[0]).toMatchObject({ action: 'membership.remove', entityId: membership.id });
    expect(log.rows[0].actor).toContain(w.people.admin.email);
  });

  it('a student role names its cohort, shown with its term', async () => {
    const res = await grant.POST(
      await apiRequest('/api/admin/memberships', {
        as: w.people.admin.id,
        body: { email: w.people.nobody.email, courseId: w.course.id, role: 'student', cohortId: w.cohort.id },
      }),
      params({}),
    );
    expect(res.status).toBe(201);
    const found = await searchPeople({ q: 'nobody' });
    expect(found.people[0].roles.find((r) => r.role === 'student')?.cohort).toBe(`${w.cohort.name} (${w.cohort.term})`);
  });

  it('refuses everyone but the administrator, changing nothing', async () => {
    const before = await models().CourseMembership.count();
    for (const as of [w.people.lead.id, w.people.instructor.id, w.people.ta.id, null]) {
      const res = await grant.POST(
        await apiRequest('/api/admin/memberships', { as, body: { email: w.people.nobody.email, courseId: w.course.id, role: 'lead' } }),
        params({}),
      );
      expect([401, 403]).toContain(res.status);
    }
    const someone = (await models().CourseMembership.findOne())!;
    const del = await removeRole.DELETE(
      await apiRequest(`/api/admin/memberships/${someone.id}`, { as: w.people.lead.id, method: 'DELETE' }),
      params({ membershipId: String(someone.id) }),
    );
    expect(del.status).toBe(403);
    expect(await models().CourseMembership.count()).toBe(before);
  });

  it('searches by part of a name, e-mail or student number, with % taken literally', async () => {
    expect((await searchPeople({ q: 'Test lea' })).people.map((p) => p.email)).toContain(w.people.lead.email);
    expect((await searchPeople({ q: w.people.student.studentNumber! })).people.map((p) => p.id)).toEqual([w.people.student.id]);
    expect((await searchPeople({ q: '%' })).total).toBe(0);
  });
});

describe('mail outbox', () => {
  it('shows a failed message with its error, and a retry sends it', async () => {
    const { EmailOutbox } = models();
    const to = `retry-${Date.now()}@test.example`;
    const row = await EmailOutbox.create({
      dedupeKey: `test-retry:${to}`,
      toAddress: to,
      subject: 'Feedback released: retry test',
      textBody: 'Sent again by the administrator.',
      htmlBody: null,
      submissionId: null,
      feedbackDocumentId: null,
      status: 'failed',
      attempts: 12,
      nextAttemptAt: new Date(),
      lockedUntil: null,
      lastError: 'connect ECONNREFUSED 127.0.0.1:25',
      messageId: null,
      sentAt: null,
    });
    const health = await outboxHealth();
    expect(health.counts.failed).toBeGreaterThanOrEqual(1);
    expect(health.problems.find((p) => p.id === row.id)).toMatchObject({
      status: 'failed',
      attempts: 12,
      lastError: 'connect ECONNREFUSED 127.0.0.1:25',
    });
    expect(health.lastError?.message).toBeTruthy();

    const refused = await retry.POST(
      await apiRequest(`/api/admin/outbox/${row.id}/retry`, { as: w.people.lead.id, method: 'POST', body: {} }),
      params({ id: String(row.id) }),
    );
    expect(refused.status).toBe(403);
    expect((await EmailOutbox.findByPk(row.id))!.status).toBe('failed');

    const res = await retry.POST(
      await apiRequest(`/api/admin/outbox/${row.id}/retry`, { as: w.people.admin.id, method: 'POST', body: {} }),
      params({ id: String(row.id) }),
    );
    expect(res.status).toBe(200);
    // The route starts a delivery pass at once; the message reaches the mail catcher.
    await expect.poll(async () => (await EmailOutbox.findByPk(row.id))!.status, { timeout: 10_000 }).toBe('sent');
    await expect.poll(async () => (await mailTo(to)).length, { timeout: 10_000 }).toBe(1);
    expect((await outboxHealth()).problems.some((p) => p.id === row.id)).toBe(false);
    const log = await auditLog(auditQuery.parse({ action: 'mail.retry' }));
    expect(log.rows[0]).toMatchObject({ entity: 'email_outbox', entityId: row.id });

    // A sent message is not sent again from here.
    const again = await retry.POST(
      await apiRequest(`/api/admin/outbox/${row.id}/retry`, { as: w.people.admin.id, method: 'POST', body: {} }),
      params({ id: String(row.id) }),
    );
    expect(again.status).toBe(409);
  });
});

describe('audit log filters', () => {
  it('filters by action, by who, by record and by day; bad filters are refused by the schema', async () => {
    const all = await auditLog(auditQuery.parse({}));
    expect(all.total).toBeGreaterThan(0);
    expect(all.actions).toContain('membership.grant');
    const byWho = await auditLog(auditQuery.parse({ actor: w.people.admin.email }));
    expect(byWho.rows.every((r) => r.actor.includes(w.people.admin.email))).toBe(true);
    const byEntity = await auditLog(auditQuery.parse({ entity: 'email_outbox' }));
    expect(byEntity.rows.every((r) => r.entity === 'email_outbox')).toBe(true);
    const future = await auditLog(auditQuery.parse({ from: '2999-01-01' }));
    expect(future.total).toBe(0);
    const today = new Date().toISOString().slice(0, 10);
    expect((await auditLog(auditQuery.parse({ from: today, to: today }))).total).toBe(all.total);
    expect(auditQuery.safeParse({ from: '1 Dec' }).success).toBe(false);
    expect(auditQuery.safeParse({ action: "x'; DROP TABLE" }).success).toBe(false);
  });
});
