import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { listRegistrations } from '@/lib/lti/admin';
import { ROLE_MAP } from '@/lib/lti/claims';
import { toolUrls } from '@/lib/lti/config';
import { activeToolKey, toolKeySummary } from '@/lib/lti/keys';
import { models } from '@/models';
import { RegistrationsAdmin } from '@/components/lti/registrations-admin';

export const dynamic = 'force-dynamic';
export const metadata = { title: 'Learning platform' };

const ROLE_WORDS = { student: 'Student', ta: 'Teaching assistant', instructor: 'Instructor', lead: 'Course lead' } as const;

export default async function LearningPlatformAdmin() {
  await authorizePage({ kind: 'admin' });
  await activeToolKey();
  const { Course, Cohort } = models();
  const [registrations, keys, courses, cohorts] = await Promise.all([
    listRegistrations(),
    toolKeySummary(),
    Course.findAll({ where: { archivedAt: null }, order: [['code', 'ASC']] }),
    Cohort.findAll({ where: { archivedAt: null }, order: [['name', 'ASC']] }),
  ]);
  const urls = toolUrls();
  return (
    <>
      <p className="mb-2 text-sm">
        <a href="/admin">← Site administration</a>
      </p>
      <PageHeader
        title="Learning platform"
        lead="Connect Oscillab to the department’s learning platform (LTI 1.3): people launch into Oscillab from their course there, rosters come from it, and released marks go back to its gradebook."
      />
      <section aria-labelledby="copy-heading" className="card mb-6">
        <h2 id="copy-heading" className="mb-1">
          For the learning platform’s administrator
        </h2>
        <p className="hint mb-3">
          Register Oscillab as an LTI 1.3 tool with these addresses; the platform then gives you the values to fill in below.
        </p>
        <dl className="grid gap-x-4 gap-y-2 text-sm md:grid-cols-[14rem_1fr]">
          <dt className="font-bold">Login initiation URL</dt>
          <dd>
            <code className="num break-all" data-copy="login">
              {urls.login}
            </code>
          </dd>
          <dt className="font-bold">Launch (redirect) URL</dt>
          <dd>
            <code className="num break-all" data-copy="launch">
              {urls.launch}
            </code>
          </dd>
          <dt className="font-bold">Deep-linking URL</dt>
          <dd>
            <code className="num break-all" data-copy="deep-link">
              {urls.deepLink}
            </code>
          </dd>
          <dt className="font-bold">Public key set (JWKS) URL</dt>
          <dd>
            <code className="num break-all" data-copy="jwks">
              {urls.keySet}
            </code>
          </dd>
          <dt className="font-bold">Services to allow</dt>
          <dd>
            Names and Role Provisioning (roster, read only); Assignment and Grade Services (line items and scores). Share the person’s name
            and e-mail.
          </dd>
          <dt className="font-bold">Placement</dt>
          <dd>
            Course items and the course’s “add from a tool” (deep linking) page. Oscillab opens in its own window when shown inside the
            platform’s page.
          </dd>
        </dl>
      </section>
      <RegistrationsAdmin
        registrations={registrations}
        keys={keys}
        courses={courses.map((c) => ({ id: c.id, code: c.code, title: c.title }))}
        cohorts={cohorts.map((c) => ({ id: c.id, courseId: c.courseId, name: c.name }))}
      />
      <section aria-labelledby="roles-heading" className="card mt-6">
        <h2 id="roles-heading" className="mb-2">
          How the platform’s roles map
        </h2>
        <p className="hint mb-3">
          Only roles in the launch’s own course count, and only in the Oscillab course it is connected to. Any other role (Mentor, Observer
          …) gives nothing; the person sees a page saying so.
        </p>
        <div className="overflow-x-auto">
          <table className="data-table">
            <thead>
              <tr>
                <th scope="col">Platform role</th>
                <th scope="col">Oscillab role</th>
                <th scope="col">Note</th>
              </tr>
            </thead>
            <tbody>
              {ROLE_MAP.map((r) => (
                <tr key={r.platform}>
                  <td>
                    <code className="text-xs break-all">{r.platform}</code>
                  </td>
                  <td>{ROLE_WORDS[r.oscillab]}</td>
                  <td>{r.note || '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
    </>
  );
}
