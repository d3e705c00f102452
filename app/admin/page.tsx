import { authorizePage } from '@/lib/authz';
import { models } from '@/models';
import { PageHeader } from '@/components/ui/page-header';

export const metadata = { title: 'Site administration' };

export default async function AdminHome() {
  await authorizePage({ kind: 'admin' });
  const { Course, User, Cohort } = models();
  const [courses, users, cohorts] = await Promise.all([Course.findAll({ order: [['code', 'ASC']] }), User.count(), Cohort.count()]);
  return (
    <>
      <PageHeader title="Site administration" lead="Courses, people and their roles across the department.">
        <a className="btn-quiet" href="/admin/learning-platform">Learning platform</a>
      </PageHeader>
      <div className="grid gap-4 md:grid-cols-3">
        <div className="card"><p className="text-sm text-ink-soft">People</p><p className="num text-2xl">{users}</p></div>
        <div className="card"><p className="text-sm text-ink-soft">Courses</p><p className="num text-2xl">{courses.length}</p></div>
        <div className="card"><p className="text-sm text-ink-soft">Cohorts</p><p className="num text-2xl">{cohorts}</p></div>
      </div>
      <section className="card mt-6">
        <h2 className="mb-3">Courses</h2>
        <ul className="space-y-1">
          {courses.map((c) => (
            <li key={c.id}>
              <a href={`/courses/${c.id}`}><span className="num">{c.code}</span> {c.title}</a>
              {c.archivedAt && <span className="ml-2 text-xs text-ink-faint">(archived)</span>}
            </li>
          ))}
        </ul>
      </section>
    </>
  );
}
