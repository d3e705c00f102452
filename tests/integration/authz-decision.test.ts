/** The decision (lib/authz/decision.ts) as a table of roles and accesses, and the request entry points of lib/authz/. */
import { beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params } from '../helpers/session';
import { buildWorld, type World } from '../helpers/world';
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import { can, authorize, managesCourse } from '@/lib/authz';
import { loadActor } from '@/lib/auth/session';
import { GET as getMe } from '@/app/api/me/route';
import { GET as getCourse } from '@/app/api/courses/[courseId]/route';
import { HttpError } from '@/lib/http';

let world: World;
beforeAll(async () => {
  world = await buildWorld();
});

describe('authorisation helper', () => {
  it('answers every access kind per role as the rules say', async () => {
    const { course, otherCourse, cohort, otherCohort, people } = world;
    const actor = async (u: { id: number }) => (await loadActor(u.id))!;
    const scope = { courseId: course.id, cohortId: cohort.id, studentId: people.student.id };
    // Expected answers as data: [person, access, allowed]
    const table: [keyof typeof people, Parameters<typeof can>[1], boolean][] = [
      ['student', { kind: 'course-staff', courseId: course.id }, false],
      ['ta', { kind: 'course-staff', courseId: course.id }, true],
      ['ta', { kind: 'course-manage', courseId: course.id }, false],
      ['instructor', { kind: 'course-manage', courseId: course.id }, true],
      ['lead', { kind: 'course-manage', courseId: course.id }, true],
      ['otherLead', { kind: 'course-manage', courseId: course.id }, false],
      ['otherLead', { kind: 'course-manage', courseId: otherCourse.id }, true],
      ['admin', { kind: 'course-manage', courseId: course.id }, true],
      ['nobody', { kind: 'course-staff', courseId: course.id }, false],
      ['student', { kind: 'submission-write', ...scope }, true],
      ['otherStudent', { kind: 'submission-write', ...scope }, false],
      ['admin', { kind: 'submission-write', ...scope }, false],
      ['student', { kind: 'submission-read', ...scope }, true],
      ['otherStudent', { kind: 'submission-read', ...scope }, false],
      ['ta', { kind: 'submission-mark', ...scope }, true],
      ['otherTa', { kind: 'submission-mark', ...scope }, false],
      ['otherTa', { kind: 'submission-mark', courseId: course.id, cohortId: otherCohort.id, studentId: people.otherStudent.id }, true],
      ['instructor', { kind: 'submission-mark', ...scope }, true],
      ['student', { kind: 'submission-mark', ...scope }, false],
      ['ta', { kind: 'statistics', courseId: course.id, cohortId: cohort.id }, true],
      ['ta', { kind: 'statistics', courseId: course.id, cohortId: otherCohort.id }, false],
      ['ta', { kind: 'statistics', courseId: course.id }, false],
      ['lead', { kind: 'statistics', courseId: course.id }, true],
      ['student', { kind: 'statistics', courseId: course.id, cohortId: cohort.id }, false],
      ['ta', { kind: 'moderate', courseId: course.id }, false],
      ['instructor', { kind: 'moderate', courseId: course.id }, true],
      ['admin', { kind: 'admin' }, true],
      ['lead', { kind: 'admin' }, false],
      ['student', { kind: 'role', role: 'student' }, true],
      ['student', { kind: 'role', role: 'ta' }, false],
      ['instructor', { kind: 'course-manager' }, true],
      ['otherLead', { kind: 'course-manager' }, true],
      ['admin', { kind: 'course-manager' }, true],
      ['ta', { kind: 'course-manager' }, false],
      ['student', { kind: 'course-manager' }, false],
    ];
    for (const [who, access, allowed] of table) {
      expect({ who, access, allowed: can(await actor(people[who]), access) }).toEqual({ who, access, allowed });
    }
    expect(can(null, { kind: 'signed-in' })).toBe(false);
    // The manager test statistics and set-up use is the decision's own.
    expect(managesCourse(await actor(people.lead), course.id)).toBe(true);
    expect(managesCourse(await actor(people.otherLead), course.id)).toBe(false);
    expect(managesCourse(await actor(people.ta), course.id)).toBe(false);
    expect(managesCourse(await actor(people.admin), course.id)).toBe(true);
  });

  it('decides in lib/authz/ only: no loader or manager test repeated elsewhere', () => {
    const files = execFileSync('git', ['ls-files', 'lib', 'app'], { encoding: 'utf8' })
      .split('\n')
      .filter((f) => /\.tsx?$/.test(f) && !f.startsWith('lib/authz/'));
    const repeats = files.filter((f) => {
      const text = fs.readFileSync(f, 'utf8');
      // The manager test written out by hand, or an access module of its own beside lib/authz/.
      return (
        /hasRole\(actor, '(instructor|lead)'\)/.test(text) || /roles\.includes\('(lead|instructor)'\)/.test(text) || /\/access\.ts$/.test(f)
      );
    });
    expect(repeats).toEqual([]);
  });

  it('authorize throws 401 without a session and 403 when not allowed', async () => {
    const { course, people } = world;
    await expect(authorize(await apiRequest('/x'))).rejects.toMatchObject({ status: 401 });
    await expect(
      authorize(await apiRequest('/x', { as: people.student.id }), { kind: 'course-manage', courseId: course.id }),
    ).rejects.toBeInstanceOf(HttpError);
    await expect(
      authorize(await apiRequest('/x', { as: people.student.id }), { kind: 'course-manage', courseId: course.id }),
    ).rejects.toMatchObject({ status: 403 });
    await expect(
      authorize(await apiRequest('/x', { as: people.instructor.id }), { kind: 'course-manage', courseId: course.id }),
    ).resolves.toMatchObject({ id: people.instructor.id });
  });

  it('a forged or foreign-signed session cookie counts as signed out', async () => {
    const forged = new Request('http://localhost:3000/api/me', {
      headers: { cookie: 'next-auth.session-token=eyJhbGciOiJIUzI1NiJ9.e30.abc' },
    });
    const res = await getMe(forged, undefined);
    expect(res.status).toBe(401);
  });
});

describe('an API route under the helper', () => {
  it('GET /api/courses/:id gives 401, 403 and 200 by role, 404 for a bad id', async () => {
    const { course, people } = world;
    const call = async (as: number | null, id = String(course.id)) =>
      (await getCourse(await apiRequest(`/api/courses/${id}`, { as }), params({ courseId: id }))).status;
    expect(await call(null)).toBe(401);
    expect(await call(people.student.id)).toBe(403);
    expect(await call(people.otherLead.id)).toBe(403);
    expect(await call(people.nobody.id)).toBe(403);
    expect(await call(people.ta.id)).toBe(200);
    expect(await call(people.instructor.id)).toBe(200);
    expect(await call(people.lead.id)).toBe(200);
    expect(await call(people.admin.id)).toBe(200);
    expect(await call(people.admin.id, '999999')).toBe(404);
    expect(await call(people.admin.id, '../etc')).toBe(404);
  });

  it('GET /api/me names the caller and their homes', async () => {
    const res = await getMe(await apiRequest('/api/me', { as: world.people.ta.id }), undefined);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.email).toBe(world.people.ta.email);
    expect(body.homes.map((h: { role: string }) => h.role)).toEqual(['ta']);
  });
});
