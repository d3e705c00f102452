import { notFound } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { models } from '@/models';
import { PracticalEditor } from '@/components/instructor/practical-editor';
import { SpectrumSettings } from '@/components/instructor/spectrum-settings';

export const dynamic = 'force-dynamic';
export const metadata = { title: 'Practical definition' };

export default async function PracticalPage({ params }: { params: Promise<{ courseId: string; practicalId: string }> }) {
  const p = await params;
  const id = Number(p.practicalId);
  const practical = Number.isSafeInteger(id) && id > 0 ? await models().Practical.findByPk(id) : null;
  if (!practical || String(practical.courseId) !== p.courseId) notFound();
  await authorizePage({ kind: 'course-manage', courseId: practical.courseId });
  const course = (await models().Course.findByPk(practical.courseId))!;
  return (
    <>
      <p className="mb-2 text-sm">
        <a href={`/courses/${course.id}`}>← {course.code}</a>
      </p>
      <PageHeader
        title={practical.title}
        lead="Definition, quantities and tolerance bands. Changes apply to new checks; you are asked before existing submissions are re-checked."
      />
      <PracticalEditor practicalId={practical.id} courseId={course.id} />
      <SpectrumSettings practicalId={practical.id} />
    </>
  );
}
