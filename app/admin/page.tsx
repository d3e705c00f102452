import Link from 'next/link';
import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { TableScroll } from '@/components/ui/table-scroll';
import { PeopleAdmin } from '@/components/admin/people-admin';
import { RetryButton } from '@/components/admin/outbox-retry';
import { auditLog, auditQuery } from '@/lib/admin/audit-log';
import { Field } from '@/components/ui/field';
import { outboxHealth } from '@/lib/admin/outbox-health';
import { coursesForGrant, searchPeople } from '@/lib/admin/people';
import { models } from '@/models';

export const metadata = { title: 'Site administration' };
export const dynamic = 'force-dynamic';

type Search = { q?: string; page?: string; action?: string; actor?: string; entity?: string; from?: string; to?: string; apage?: string };

const when = (iso: string) => new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC' }) + ' UTC';

function ago(iso: string, now = Date.now()): string {
  const min = Math.round((now - new Date(iso).getTime()) / 60_000);
  if (min < 1) return 'just now';
  if (min < 90) return `${min} min ago`;
  const h = Math.round(min / 60);
  return h < 48 ? `${h} h ago` : `${Math.round(h / 24)} days ago`;
}

/** Page links that keep the other section's filters. */
function href(current: Search, patch: Partial<Search>) {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries({ ...current, ...patch })) if (v) p.set(k, String(v));
  return `/admin?${p.toString()}`;
}

/** Before/after of an entry: short ones inline, long ones folded (wrapped, never a scroll box). */
function Json({ value }: { value: unknown }) {
  if (value === null || value === undefined) return <span className="text-ink-soft">—</span>;
  const text = JSON.stringify(value);
  if (text.length <= 100) return <code className="num break-all text-xs">{text}</code>;
  const fields = value && typeof value === 'object' ? Object.keys(value as object).length : 0;
  return (
    <details className="max-w-[28rem] text-xs">
      <summary className="cursor-pointer">{fields ? `${fields} fields` : 'Show'}</summary>
      <pre className="num whitespace-pre-wrap break-all">{JSON.stringify(value, null, 1)}</pre>
    </details>
  );
}

export default async function AdminHome({ searchParams }: { searchParams: Promise<Search> }) {
  await authorizePage({ kind: 'admin' });
  const sp = await searchParams;
  const auditParsed = auditQuery.safeParse({
    action: sp.action,
    actor: sp.actor,
    entity: sp.entity,
    from: sp.from,
    to: sp.to,
    page: sp.apage,
  });
  const { Course, User, Cohort } = models();
  const [people, grantCourses, outbox, audit, counts] = await Promise.all([
    searchPeople({ q: sp.q ?? '', page: sp.page ?? 1 }).catch(() => searchPeople({})),
    coursesForGrant(),
    outboxHealth(),
    auditLog(auditParsed.success ? auditParsed.data : auditQuery.parse({})),
    Promise.all([User.count(), Course.count(), Cohort.count()]),
  ]);
  const [userCount, courseCount, cohortCount] = counts;
  const o = outbox;
  const healthy = o.counts.failed === 0 && o.retrying === 0;
  return (
    <>
      <PageHeader title="Site administration" lead="People and their course roles, the mail outbox, the audit log and the courses.">
        <a className="btn-quiet" href="/admin/learning-platform">
          Learning platform
        </a>
      </PageHeader>
      <nav aria-label="Sections" className="mb-6 flex flex-wrap gap-2 text-sm">
        <a className="btn-quiet" href="#people">
          People ({userCount})
        </a>
        <a className="btn-quiet" href="#outbox">
          Mail outbox {healthy ? '✓' : `⚑ ${o.counts.failed + o.retrying} failing`}
        </a>
        <a className="btn-quiet" href="#audit">
          Audit log
        </a>
        <a className="btn-quiet" href="#courses">
          Courses ({courseCount}), cohorts ({cohortCount})
        </a>
      </nav>
      <PeopleSection sp={sp} people={people} grantCourses={grantCourses} />
      <OutboxSection o={o} healthy={healthy} />
      <AuditSection sp={sp} audit={audit} parsed={auditParsed} />
      <CoursesSection grantCourses={grantCourses} />
    </>
  );
}

type People = Awaited<ReturnType<typeof searchPeople>>;
type GrantCourses = Awaited<ReturnType<typeof coursesForGrant>>;
type Outbox = Awaited<ReturnType<typeof outboxHealth>>;
type Audit = Awaited<ReturnType<typeof auditLog>>;
type AuditParsed = ReturnType<typeof auditQuery.safeParse>;

function PeopleSection({ sp, people, grantCourses }: { sp: Search; people: People; grantCourses: GrantCourses }) {
  return (
    <section aria-labelledby="people" className="card mb-6">
      <h2 id="people" className="mb-3">
        People
      </h2>
      <form method="get" action="/admin#people" className="mb-2 flex flex-wrap items-end gap-2" role="search" aria-label="People">
        <Field id="people-q" label="Search by name, e-mail or student number" className="min-w-0 grow basis-60">
          <input name="q" className="field" defaultValue={people.q} />
        </Field>
        {(['action', 'actor', 'entity', 'from', 'to'] as const).map((k) =>
          sp[k] ? <input key={k} type="hidden" name={k} value={sp[k]} /> : null,
        )}
        <button type="submit" className="btn">
          Search
        </button>
        {people.q && (
          <a className="btn-quiet" href={href(sp, { q: '', page: '' })}>
            Show everyone
          </a>
        )}
      </form>
      <p className="text-sm text-ink-soft" role="status">
        {people.total} {people.total === 1 ? 'person' : 'people'}
        {people.q ? ` match “${people.q}”` : ''}
        {people.pages > 1 ? ` · page ${people.page} of ${people.pages}` : ''}
      </p>
      <PeopleAdmin people={people.people} courses={grantCourses} />
      {people.pages > 1 && (
        <nav aria-label="People pages" className="mt-3 flex items-center gap-2 text-sm">
          {people.page > 1 && (
            <Link className="btn-quiet" href={href(sp, { page: String(people.page - 1) }) + '#people'}>
              Previous page
            </Link>
          )}
          {people.page < people.pages && (
            <Link className="btn-quiet" href={href(sp, { page: String(people.page + 1) }) + '#people'}>
              Next page
            </Link>
          )}
        </nav>
      )}
    </section>
  );
}

function OutboxSection({ o, healthy }: { o: Outbox; healthy: boolean }) {
  return (
    <section aria-labelledby="outbox" className="card mb-6">
      <h2 id="outbox" className="mb-1">
        Mail outbox
      </h2>
      <p className={`mb-3 text-sm font-bold ${healthy ? 'text-verdict-within' : 'text-verdict-outside'}`} data-testid="outbox-state">
        <span aria-hidden="true">{healthy ? '✓ ' : '⚑ '}</span>
        {healthy
          ? 'Mail is going out: nothing is failing.'
          : `${o.counts.failed} failed for good, ${o.retrying} failing and being retried.`}
      </p>
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        {(
          [
            ['Waiting to send', o.counts.queued + o.counts.sending],
            ['Retrying', o.retrying],
            ['Failed', o.counts.failed],
            ['Sent, last 24 h', o.counts.sentLastDay],
          ] as const
        ).map(([k, v]) => (
          <div key={k}>
            <dt className="text-xs font-bold uppercase tracking-wide text-ink-soft">{k}</dt>
            <dd className="num text-xl">{v}</dd>
          </div>
        ))}
      </dl>
      <p className="mt-2 text-sm text-ink-soft">
        {o.oldestQueuedAt ? `Oldest waiting message queued ${ago(o.oldestQueuedAt)}.` : 'No message is waiting.'}
        {o.lastError ? ` Last error (${ago(o.lastError.at)}, to ${o.lastError.to}): ` : ''}
        {o.lastError && <span className="num text-ink">{o.lastError.message}</span>}
      </p>
      {o.problems.length > 0 && (
        <TableScroll label="Failing messages" className="mt-3">
          <table className="data-table">
            <thead>
              <tr>
                <th scope="col">To</th>
                <th scope="col">Subject</th>
                <th scope="col">State</th>
                <th scope="col" className="num">
                  Attempts
                </th>
                <th scope="col">Last error</th>
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {o.problems.map((p) => (
                <tr key={p.id} data-outbox={p.id}>
                  <td>{p.to}</td>
                  <td>{p.subject}</td>
                  <td className="whitespace-nowrap">
                    {p.status === 'failed' ? '✗ failed' : `↻ retrying${p.nextAttemptAt ? `, next ${when(p.nextAttemptAt)}` : ''}`}
                  </td>
                  <td className="num">{p.attempts}</td>
                  <td className="font-mono text-xs">{p.lastError ?? '—'}</td>
                  <td>
                    <RetryButton id={p.id} label={`the message to ${p.to}`} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </TableScroll>
      )}
    </section>
  );
}

function AuditSection({ sp, audit, parsed: auditParsed }: { sp: Search; audit: Audit; parsed: AuditParsed }) {
  return (
    <section aria-labelledby="audit" className="card mb-6">
      <h2 id="audit" className="mb-3">
        Audit log
      </h2>
      <form
        method="get"
        action="/admin#audit"
        className="mb-3 grid gap-3 sm:grid-cols-2 lg:grid-cols-[1fr_1fr_1fr_auto_auto_auto] lg:items-end"
        aria-label="Filter the audit log"
      >
        {sp.q && <input type="hidden" name="q" value={sp.q} />}
        <Field id="audit-action" label="Action">
          <select name="action" className="field" defaultValue={auditParsed.success ? auditParsed.data.action : ''}>
            <option value="">Any</option>
            {audit.actions.map((a) => (
              <option key={a} value={a}>
                {a}
              </option>
            ))}
          </select>
        </Field>
        <Field id="audit-actor" label="By (name or e-mail)">
          <input name="actor" className="field" defaultValue={sp.actor ?? ''} />
        </Field>
        <Field id="audit-entity" label="Record">
          <select name="entity" className="field" defaultValue={auditParsed.success ? auditParsed.data.entity : ''}>
            <option value="">Any</option>
            {audit.entities.map((e) => (
              <option key={e} value={e}>
                {e.replace(/_/g, ' ')}
              </option>
            ))}
          </select>
        </Field>
        <Field id="audit-from" label="From">
          <input name="from" type="date" className="field num" defaultValue={sp.from ?? ''} />
        </Field>
        <Field id="audit-to" label="To">
          <input name="to" type="date" className="field num" defaultValue={sp.to ?? ''} />
        </Field>
        <div className="flex gap-2">
          <button type="submit" className="btn">
            Filter
          </button>
          <a className="btn-quiet" href={href({ q: sp.q }, {}) + '#audit'}>
            Clear
          </a>
        </div>
      </form>
      {!auditParsed.success && (
        <p className="error-text" role="alert">
          {auditParsed.error.issues[0]?.message ?? 'Those filters could not be read.'} Showing everything.
        </p>
      )}
      <p className="mb-2 text-sm text-ink-soft" role="status">
        {audit.total} entr{audit.total === 1 ? 'y' : 'ies'}
        {audit.pages > 1 ? ` · page ${audit.page} of ${audit.pages}` : ''}
      </p>
      <TableScroll label="Audit log entries">
        <table className="data-table" data-testid="audit-table">
          <thead>
            <tr>
              <th scope="col">When</th>
              <th scope="col">Who</th>
              <th scope="col">Action</th>
              <th scope="col">Record</th>
              <th scope="col">Before</th>
              <th scope="col">After</th>
            </tr>
          </thead>
          <tbody>
            {audit.rows.map((r) => (
              <tr key={r.id} data-action={r.action}>
                <td className="whitespace-nowrap font-mono text-xs">{when(r.at)}</td>
                <td className="text-sm">{r.actor}</td>
                <td className="whitespace-nowrap font-mono text-xs">{r.action}</td>
                <td className="whitespace-nowrap text-sm">
                  {r.entity.replace(/_/g, ' ')}
                  {r.entityId !== null ? ` ${r.entityId}` : ''}
                </td>
                <td>
                  <Json value={r.before} />
                </td>
                <td>
                  <Json value={r.after} />
                </td>
              </tr>
            ))}
            {audit.rows.length === 0 && (
              <tr>
                <td colSpan={6} className="text-ink-soft">
                  Nothing matches these filters.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </TableScroll>
      {audit.pages > 1 && (
        <nav aria-label="Audit log pages" className="mt-3 flex items-center gap-2 text-sm">
          {audit.page > 1 && (
            <Link className="btn-quiet" href={href(sp, { apage: String(audit.page - 1) }) + '#audit'}>
              Newer
            </Link>
          )}
          {audit.page < audit.pages && (
            <Link className="btn-quiet" href={href(sp, { apage: String(audit.page + 1) }) + '#audit'}>
              Older
            </Link>
          )}
        </nav>
      )}
    </section>
  );
}

function CoursesSection({ grantCourses }: { grantCourses: GrantCourses }) {
  return (
    <section aria-labelledby="courses" className="card mb-6">
      <h2 id="courses" className="mb-3">
        Courses
      </h2>
      <ul className="space-y-1">
        {grantCourses.map((c) => (
          <li key={c.id}>
            <a href={`/courses/${c.id}`}>
              <span className="num">{c.code}</span> {c.title}
            </a>
            {c.archived && <span className="ml-2 text-xs text-ink-faint">(archived)</span>}
            <span className="ml-2 text-sm text-ink-soft">{c.cohorts.map((h) => `${h.name} (${h.term})`).join(', ')}</span>
          </li>
        ))}
      </ul>
    </section>
  );
}
