'use client';
/** The platform courses connected to one registration, and the form that connects another. */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { api } from '@/lib/api-client';
import type { RegistrationView } from '@/lib/lti/admin';
import { Status, type Cohort, type Course, type Message } from './shared';

export function Contexts({ registration, courses, cohorts }: { registration: RegistrationView; courses: Course[]; cohorts: Cohort[] }) {
  const router = useRouter();
  const [contextId, setContextId] = useState('');
  const [courseId, setCourseId] = useState('');
  const [cohortId, setCohortId] = useState('');
  const [msg, setMsg] = useState<Message>(null);
  const connect = async () => {
    const r = await api.post('/api/lti/contexts', {
      registrationId: registration.id,
      contextId,
      courseId: Number(courseId),
      defaultCohortId: cohortId ? Number(cohortId) : null,
    });
    setMsg(r.ok ? { ok: true, text: 'Course connected.' } : { ok: false, text: r.error.message });
    if (r.ok) {
      setContextId('');
      router.refresh();
    }
  };
  const disconnect = async (id: number) => {
    if (!window.confirm('Disconnect this course? People, roles and work in Oscillab stay; queued scores for it are dropped.')) return;
    const r = await api.delete(`/api/lti/contexts/${id}`);
    setMsg(r.ok ? { ok: true, text: 'Disconnected.' } : { ok: false, text: r.error.message });
    router.refresh();
  };
  const prefix = `ctx-${registration.id}`;
  return (
    <div className="mt-3">
      <h4 className="text-sm font-bold">Connected courses</h4>
      {registration.contexts.length === 0 ? (
        <p className="text-sm text-ink-soft">None yet. A launch from an unconnected course is refused with a page naming its context id.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="data-table mt-1">
            <thead>
              <tr>
                <th scope="col">Platform course (context id)</th>
                <th scope="col">Oscillab course</th>
                <th scope="col">Services offered</th>
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {registration.contexts.map((c) => (
                <tr key={c.id}>
                  <td>
                    {c.title ?? '—'} <code className="text-xs break-all">{c.contextId}</code>
                  </td>
                  <td>
                    <a href={`/courses/${c.courseId}/learning-platform`}>{c.courseCode}</a>
                  </td>
                  <td>
                    {c.services.roster ? '✓ roster' : '– roster'} · {c.services.gradebook ? '✓ gradebook' : '– gradebook'}
                  </td>
                  <td>
                    <button type="button" className="btn-quiet" onClick={() => disconnect(c.id)}>
                      Disconnect
                    </button>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <div className="mt-2 flex flex-wrap items-end gap-2">
        <div>
          <label htmlFor={`${prefix}-id`} className="label">
            Platform context id
          </label>
          <input id={`${prefix}-id`} className="field" value={contextId} onChange={(e) => setContextId(e.target.value)} />
        </div>
        <div>
          <label htmlFor={`${prefix}-course`} className="label">
            Oscillab course
          </label>
          <select
            id={`${prefix}-course`}
            className="field"
            value={courseId}
            onChange={(e) => {
              setCourseId(e.target.value);
              setCohortId('');
            }}
          >
            <option value="">Choose…</option>
            {courses.map((c) => (
              <option key={c.id} value={c.id}>
                {c.code} {c.title}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor={`${prefix}-cohort`} className="label">
            Cohort for its students
          </label>
          <select id={`${prefix}-cohort`} className="field" value={cohortId} onChange={(e) => setCohortId(e.target.value)}>
            <option value="">The course’s only cohort</option>
            {cohorts
              .filter((c) => String(c.courseId) === courseId)
              .map((c) => (
                <option key={c.id} value={c.id}>
                  {c.name}
                </option>
              ))}
          </select>
        </div>
        <button type="button" className="btn-quiet" disabled={!contextId.trim() || !courseId} onClick={connect}>
          Connect
        </button>
      </div>
      <Status message={msg} />
    </div>
  );
}
