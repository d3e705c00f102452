import { notFound } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { SubmissionForm, type FormQuantity } from '@/components/student/submission-form';
import { AttemptResult } from '@/components/student/attempt-result';
import { HazardNotes } from '@/components/hazard-notes';
import { renderInstructions } from '@/lib/instructor/markdown';
import { isQuantityKey, QUANTITIES, unitsFor } from '@/lib/grading';
import { studentPlacement } from '@/lib/authz/placement';
import { speciesDisplay } from '@/lib/grading';
import { attemptsUsed, findDraft, readDraft } from '@/lib/submissions/service';
import { timeLeft } from '@/lib/submissions/student-home';
import { studentAttemptViews } from '@/lib/submissions/view';
import { models } from '@/models';
import { spectrumFormProps } from '@/lib/submissions/spectrum-form';

export const dynamic = 'force-dynamic';
export const metadata = { title: 'Practical' };

const OVERTONE_KEYS = new Set(['omegaE', 'omegaExe', 'forceConstantE', 'zeroPointEnergy', 'dissociationEnergy', 'dissociationEnergy0']);

export default async function PracticalPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  if (!/^\d{1,12}$/.test(id)) notFound();
  const actor = await authorizePage({ kind: 'role', role: 'student' });
  const { Practical, QuantityDefinition, Submission, Upload } = models();
  const practical = await Practical.findByPk(Number(id));
  if (!practical || practical.archivedAt) notFound();
  const pc = await studentPlacement(actor, practical);
  if (!pc) notFound();
  await authorizePage({ kind: 'submission-write', courseId: practical.courseId, cohortId: pc.cohortId, studentId: actor.id });

  // Independent reads together; the uploads the draft names in one query, not one per file.
  const [qdefs, draftRow, { used, extra }, attempts] = await Promise.all([
    QuantityDefinition.findAll({
      where: { practicalId: practical.id },
      order: [
        ['position', 'ASC'],
        ['id', 'ASC'],
      ],
    }),
    findDraft(practical.id, actor.id),
    attemptsUsed(practical.id, actor.id),
    Submission.findAll({ where: { practicalId: practical.id, studentId: actor.id }, order: [['attempt', 'DESC']] }),
  ]);
  const draft = readDraft(draftRow?.draft, practical.species);
  const uploadIds = [draft.spectrumUploadId, draft.reportUploadId].filter((x): x is number => x !== null);
  const [views, uploadRows] = await Promise.all([
    studentAttemptViews(
      attempts.filter((a) => a.attempt > 0),
      practical,
    ),
    uploadIds.length ? Upload.findAll({ where: { id: uploadIds }, attributes: ['id', 'originalName'] }) : Promise.resolve([]),
  ]);
  const uploadName = (uid: number | null) => (uid ? (uploadRows.find((u) => u.id === uid)?.originalName ?? null) : null);

  const quantities: FormQuantity[] = qdefs
    .filter((q) => isQuantityKey(q.key))
    .map((q) => {
      const info = QUANTITIES[q.key as keyof typeof QUANTITIES];
      const options = Array.from(new Set([q.unit, ...unitsFor(info.dimension).map((u) => u.display)])).filter(Boolean);
      return {
        key: q.key,
        species: q.species,
        label: info.label,
        unit: q.unit,
        unitOptions: options,
        uncertaintyRequired: q.uncertaintyRequired,
        dimension: info.dimension,
      };
    });
  const deadline = new Date(pc.deadline);

  return (
    <>
      <PageHeader
        title={practical.title}
        lead={
          practical.mode === 'practice'
            ? 'Practice: check your numbers at any time without using an attempt; each submitted attempt shows its checks at once.'
            : 'Assessed: check the format of your draft at any time without using an attempt; verdicts and marks come when the marking is released.'
        }
      />
      <div className="mb-6 grid gap-4 md:grid-cols-3">
        <div className="card">
          <h2 className="text-base">Deadline</h2>
          <p className="num">{deadline.toLocaleString('en-GB', { dateStyle: 'full', timeStyle: 'short' })}</p>
          <p className="text-sm text-ink-soft">
            {timeLeft(deadline)}
            {practical.lateRule === 'penalty'
              ? ` · late work loses ${practical.latePenaltyPerDay} % per day started, at most ${practical.latePenaltyCap} %`
              : practical.lateRule === 'not-accepted'
                ? ' · late work is not accepted'
                : ''}
          </p>
        </div>
        <div className="card">
          <h2 className="text-base">Attempts</h2>
          <p>
            <span className="num">{Math.max(0, practical.maxAttempts + extra - used)}</span> of{' '}
            <span className="num">{practical.maxAttempts + extra}</span> left
          </p>
          <p className="text-sm text-ink-soft">Your last submitted attempt is the one marked.</p>
        </div>
        {practical.hazardNotes.trim() && (
          <div>
            <HazardNotes notes={practical.hazardNotes} />
          </div>
        )}
      </div>
      {practical.instructions.trim() && (
        <section className="card mb-6" aria-labelledby="instructions">
          <h2 id="instructions">Instructions</h2>
          <div className="prose mt-2 max-w-none" dangerouslySetInnerHTML={{ __html: renderInstructions(practical.instructions) }} />
        </section>
      )}
      <h2 className="mb-3">Your submission</h2>
      <SubmissionForm
        practicalId={practical.id}
        draftId={draftRow?.id ?? null}
        version={draftRow?.version ?? 0}
        initialDraft={draft}
        species={practical.species.map((s) => ({ name: s, display: speciesDisplay(s) }))}
        quantities={quantities}
        askOvertone={qdefs.some((q) => OVERTONE_KEYS.has(q.key))}
        attemptsLeft={Math.max(0, practical.maxAttempts + extra - used)}
        mode={practical.mode}
        uploads={{ spectrum: uploadName(draft.spectrumUploadId), report: uploadName(draft.reportUploadId) }}
        {...await spectrumFormProps(practical, draft)}
      />
      {views.length > 0 && (
        <section className="mt-8 space-y-4" aria-labelledby="attempts">
          <h2 id="attempts">Your submitted attempts</h2>
          <p className="text-sm text-ink-soft">Newest first. The last one you submitted is the one that is marked.</p>
          {views.map((v) => (
            <AttemptResult key={v.id} view={v} />
          ))}
        </section>
      )}
    </>
  );
}
