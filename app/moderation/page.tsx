import { redirect } from 'next/navigation';
import { authorizePage, coursesWhere } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { ModerationBoard } from '@/components/marking/moderation-board';
import { models } from '@/models';

export const metadata = { title: 'Moderation' };
export const dynamic = 'force-dynamic';

export default async function ModerationPage({ searchParams }: { searchParams: Promise<{ courseId?: string }> }) {
  const actor = await authorizePage({ kind: 'signed-in' });
  // The same rule as GET /api/moderation: lib/authz.ts decides, the administrator included.
  const ids = await coursesWhere(actor, 'moderate');
  if (!ids.length) redirect('/not-permitted');
  const courses = await models().Course.findAll({ where: { id: ids }, order: [['code', 'ASC']] });
  const wanted = Number((await searchParams).courseId);
  const current = courses.find((c) => c.id === wanted) ?? courses[0];
  return (
    <>
      <PageHeader
        title="Moderation"
        lead="A sample of each marker’s marked submissions (10 %, at least one), with the engine’s proposal beside the marker’s marks."
      />
      <nav aria-label="Courses" className="mb-4 flex flex-wrap gap-2">
        {courses.map((c) => (
          <a
            key={c.id}
            href={`/moderation?courseId=${c.id}`}
            className={c.id === current.id ? 'btn' : 'btn-quiet'}
            aria-current={c.id === current.id ? 'page' : undefined}
          >
            {c.code}
          </a>
        ))}
      </nav>
      <ModerationBoard courseId={current.id} />
    </>
  );
}
