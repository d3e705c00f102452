import { authorizePage } from '@/lib/authz';
import { HttpError } from '@/lib/http-error';
import { PageHeader } from '@/components/ui/page-header';
import { readDeepLinkTicket, type DeepLinkTicket } from '@/lib/lti/deep-link';
import { models } from '@/models';
import { speciesDisplay } from '@/lib/grading';

export const dynamic = 'force-dynamic';
export const metadata = { title: 'Choose a practical for the learning platform' };

/** Deep linking: the instructor picks which practical the new learning-platform item opens. */
export default async function DeepLinkChooser({ searchParams }: { searchParams: Promise<{ t?: string }> }) {
  const actor = await authorizePage({ kind: 'signed-in' });
  const { t = '' } = await searchParams;
  let ticket: DeepLinkTicket;
  try {
    ticket = await readDeepLinkTicket(t, actor.id);
  } catch (error) {
    return (
      <>
        <PageHeader title="Choose a practical" />
        <p className="card" role="alert">
          ✗ {error instanceof HttpError ? error.message : 'This choice is not valid.'}
        </p>
      </>
    );
  }
  const { LtiContext, Course, Practical, PracticalCohort, Cohort } = models();
  const ctx = await LtiContext.findByPk(ticket.ltiContextId);
  if (!ctx)
    return (
      <p className="card" role="alert">
        ✗ This learning-platform course is no longer connected to Oscillab.
      </p>
    );
  await authorizePage({ kind: 'course-manage', courseId: ctx.courseId });
  const course = (await Course.findByPk(ctx.courseId))!;
  const practicals = await Practical.findAll({
    where: { courseId: ctx.courseId, archivedAt: null },
    order: [
      ['title', 'ASC'],
      ['id', 'DESC'],
    ],
  });
  // Practicals copied from year to year share a title: the cohorts they are set for tell them apart.
  const placements = await PracticalCohort.findAll({ where: { practicalId: practicals.map((p) => p.id) } });
  const cohorts = await Cohort.findAll({ where: { id: [...new Set(placements.map((p) => p.cohortId))] } });
  const setFor = (practicalId: number) => {
    const names = placements
      .filter((p) => p.practicalId === practicalId)
      .map((p) => cohorts.find((c) => c.id === p.cohortId))
      .filter((c) => c !== undefined)
      .map((c) => `${c.name}, ${c.term}`);
    return names.length ? `for ${names.join('; ')}` : 'not set for any cohort';
  };
  return (
    <>
      <PageHeader
        title="Choose a practical for the learning platform"
        lead={`The new item in “${ctx.title ?? ctx.contextId}” will open this practical of ${course.code}; its marks go to a gradebook column of the same name.`}
      />
      {practicals.length === 0 ? (
        <p className="card">
          This course has no open practical yet. <a href={`/courses/${course.id}`}>Set one up</a>, then place the item again from the
          learning platform.
        </p>
      ) : (
        <form method="post" action="/api/lti/deep-link" className="card max-w-2xl">
          <input type="hidden" name="t" value={t} />
          <fieldset>
            <legend className="label mb-2">Practical</legend>
            <ul className="space-y-2">
              {practicals.map((p, i) => (
                <li key={p.id}>
                  <label className="flex items-baseline gap-2">
                    <input type="radio" name="practicalId" value={p.id} defaultChecked={i === 0} />
                    <span>
                      <span className="font-bold">{p.title}</span>{' '}
                      <span className="text-sm text-ink-soft">
                        · {p.mode === 'practice' ? 'practice' : 'assessed'} · {p.species.map(speciesDisplay).join(', ')} · {setFor(p.id)}
                      </span>
                    </span>
                  </label>
                </li>
              ))}
            </ul>
          </fieldset>
          <button type="submit" className="btn mt-4">
            Place in the learning platform
          </button>
        </form>
      )}
    </>
  );
}
