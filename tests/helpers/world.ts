/**
 * A small invented course with one person per role the authorisation rules distinguish, for
 * integration tests: built through the models on the test's own database.
 */
import { models } from '@/models';
import { hashPassword } from '@/lib/auth/password';

export const TEST_PASSWORD = 'correct-horse-battery';

export type World = Awaited<ReturnType<typeof buildWorld>>;

let counter = 0;

export async function buildWorld() {
  const { User, Course, Cohort, CourseMembership, TaAssignment } = models();
  const n = ++counter;
  const passwordHash = await hashPassword(TEST_PASSWORD);
  const user = (key: string, extra: Partial<{ isAdmin: boolean; studentNumber: string }> = {}) =>
    User.create({ email: `${key}.${n}@test.example`, name: `Test ${key}`, passwordHash, isAdmin: false, studentNumber: null, ...extra });

  const course = await Course.create({ code: `TEST${n}01`, title: 'Test course', archivedAt: null });
  const otherCourse = await Course.create({ code: `TEST${n}02`, title: 'Other test course', archivedAt: null });
  const cohort = await Cohort.create({
    courseId: course.id,
    name: 'Cohort 1',
    term: '2026 Autumn',
    instrument: 'Bench 1',
    archivedAt: null,
  });
  const otherCohort = await Cohort.create({
    courseId: course.id,
    name: 'Cohort 2',
    term: '2026 Autumn',
    instrument: 'Bench 2',
    archivedAt: null,
  });
  const foreignCohort = await Cohort.create({
    courseId: otherCourse.id,
    name: 'Cohort X',
    term: '2026 Autumn',
    instrument: null,
    archivedAt: null,
  });

  const people = {
    admin: await user('admin', { isAdmin: true }),
    student: await user('student', { studentNumber: `S${n}001` }),
    otherStudent: await user('other-student', { studentNumber: `S${n}002` }),
    ta: await user('ta'),
    otherTa: await user('other-ta'),
    instructor: await user('instructor'),
    lead: await user('lead'),
    otherLead: await user('other-lead'),
    nobody: await user('nobody'),
  };
  const member = (userId: number, courseId: number, role: 'student' | 'ta' | 'instructor' | 'lead', cohortId: number | null = null) =>
    CourseMembership.create({ userId, courseId, role, cohortId });
  await member(people.student.id, course.id, 'student', cohort.id);
  await member(people.otherStudent.id, course.id, 'student', otherCohort.id);
  await member(people.ta.id, course.id, 'ta');
  await member(people.otherTa.id, course.id, 'ta');
  await member(people.instructor.id, course.id, 'instructor');
  await member(people.lead.id, course.id, 'lead');
  await member(people.otherLead.id, otherCourse.id, 'lead');
  await TaAssignment.create({ cohortId: cohort.id, taId: people.ta.id, studentId: null });
  await TaAssignment.create({ cohortId: otherCohort.id, taId: people.otherTa.id, studentId: null });

  return { course, otherCourse, cohort, otherCohort, foreignCohort, people };
}
