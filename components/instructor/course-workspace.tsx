'use client';
import { useMemo, useState } from 'react';
import { useRouter } from 'next/navigation';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { cohortCreateSchema, staffAddSchema, type CohortCreateInput, type StaffAddInput } from '@/lib/schemas/instructor';
import { DataTable } from './data-table';
import { api, useApi } from '@/lib/api-client';
import type { CoursePeople, StaffAdded } from '@/lib/instructor/courses';
import type { PracticalCreated } from '@/lib/instructor/practicals';
import { formatDate, type CourseSummary } from './courses-overview';
import { RosterImport } from './roster-import';
import { cohortName } from '@/lib/display';
import { ROLE_NAMES } from '@/lib/homes';
import { Field } from '@/components/ui/field';

type People = CoursePeople;
type Person = People['people'][number];

export function CourseWorkspace({ course }: { course: CourseSummary }) {
  const router = useRouter();
  const people = useApi<People>(`/api/courses/${course.id}/roster`);
  const refresh = () => {
    router.refresh();
    void people.mutate();
  };
  return (
    <div className="space-y-6">
      <CourseSettings course={course} onChange={refresh} />
      <Cohorts course={course} onChange={refresh} />
      <RosterImport courseId={course.id} cohorts={course.cohorts.filter((c) => !c.archived)} onImported={refresh} />
      <PeopleList course={course} people={people.data} onChange={refresh} />
      <TaDuties course={course} people={people.data} onChange={refresh} />
      <Practicals course={course} />
    </div>
  );
}

function Status({ message }: { message: { ok: boolean; text: string } | null }) {
  return (
    <p aria-live="polite" className={message?.ok ? 'mt-2 text-sm text-verdict-within' : 'error-text'}>
      {message ? `${message.ok ? '✓' : '✗'} ${message.text}` : ''}
    </p>
  );
}

function CourseSettings({ course, onChange }: { course: CourseSummary; onChange: () => void }) {
  const [title, setTitle] = useState(course.title);
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const save = async (body: object, done: string) => {
    const r = await api.patch(`/api/courses/${course.id}`, body);
    setMsg(r.ok ? { ok: true, text: done } : { ok: false, text: r.error.message });
    if (r.ok) onChange();
  };
  return (
    <section aria-labelledby="course-settings" className="card">
      <h2 id="course-settings" className="mb-3">
        Course
      </h2>
      <div className="flex flex-wrap items-end gap-3">
        <Field id="course-title-edit" label="Title" className="min-w-0 grow basis-64">
          <input className="field" value={title} onChange={(e) => setTitle(e.target.value)} />
        </Field>
        <button type="button" className="btn" onClick={() => save({ title }, 'Course renamed.')}>
          Rename
        </button>
        <button
          type="button"
          className="btn-quiet"
          onClick={() => save({ archived: !course.archived }, course.archived ? 'Course restored.' : 'Course archived.')}
        >
          {course.archived ? 'Restore course' : 'Archive course'}
        </button>
      </div>
      <Status message={msg} />
    </section>
  );
}

type CohortRow = CourseSummary['cohorts'][number];

function Cohorts({ course, onChange }: { course: CourseSummary; onChange: () => void }) {
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const [editing, setEditing] = useState<CohortRow | null>(null);
  const { register, handleSubmit, formState, reset, setError } = useForm<CohortCreateInput>({ resolver: zodResolver(cohortCreateSchema) });
  async function onCreate(values: CohortCreateInput) {
    const r = await api.post(`/api/courses/${course.id}/cohorts`, values);
    if (!r.ok) {
      for (const [k, v] of Object.entries(r.error.fields)) setError(k as keyof CohortCreateInput, { message: v[0] });
      setMsg({ ok: false, text: r.error.message });
      return;
    }
    setMsg({ ok: true, text: `Cohort "${values.name}" created.` });
    reset({ name: '', term: values.term, instrument: '' });
    onChange();
  }
  const patch = async (c: CohortRow, body: object, done: string) => {
    const r = await api.patch(`/api/courses/${course.id}/cohorts/${c.id}`, body);
    setMsg(r.ok ? { ok: true, text: done } : { ok: false, text: r.error.message });
    if (r.ok) {
      setEditing(null);
      onChange();
    }
  };
  const columns: ColumnDef<CohortRow, unknown>[] = [
    { accessorKey: 'name', header: 'Cohort' },
    { accessorKey: 'term', header: 'Term' },
    { accessorKey: 'instrument', header: 'Instrument', cell: ({ getValue }) => (getValue() as string) || '—' },
    { id: 'status', accessorFn: (c) => (c.archived ? 'archived' : 'open'), header: 'Status' },
    {
      id: 'actions',
      header: 'Actions',
      enableSorting: false,
      cell: ({ row }) => (
        <span className="flex flex-wrap gap-2">
          <button type="button" className="btn-quiet" onClick={() => setEditing(row.original)}>
            Edit<span className="sr-only"> {row.original.name}</span>
          </button>
          <button
            type="button"
            className="btn-quiet"
            onClick={() =>
              patch(row.original, { archived: !row.original.archived }, row.original.archived ? 'Cohort restored.' : 'Cohort archived.')
            }
          >
            {row.original.archived ? 'Restore' : 'Archive'}
            <span className="sr-only"> {row.original.name}</span>
          </button>
        </span>
      ),
    },
  ];
  return (
    <section aria-labelledby="cohorts" className="card">
      <h2 id="cohorts" className="mb-3">
        Cohorts
      </h2>
      <DataTable data={course.cohorts} columns={columns} label="Cohorts" />
      {editing && (
        <CohortEdit cohort={editing} onSave={(body) => patch(editing, body, 'Cohort saved.')} onCancel={() => setEditing(null)} />
      )}
      <h3 className="mb-2 mt-4">New cohort</h3>
      <form onSubmit={handleSubmit(onCreate)} noValidate className="grid gap-3 md:grid-cols-[1fr_1fr_1fr_auto] md:items-end">
        <Field id="cohort-name" label="Name" error={formState.errors.name?.message}>
          <input className="field" {...register('name')} />
        </Field>
        <Field id="cohort-term" label="Term" error={formState.errors.term?.message}>
          <input className="field" placeholder="2027 Spring" {...register('term')} />
        </Field>
        <Field id="cohort-instrument" label="Instrument">
          <input className="field" placeholder="FTIR bench 2 (1 cm⁻¹)" {...register('instrument')} />
        </Field>
        <button type="submit" className="btn" disabled={formState.isSubmitting}>
          Create cohort
        </button>
      </form>
      <Status message={msg} />
    </section>
  );
}

function CohortEdit({ cohort, onSave, onCancel }: { cohort: CohortRow; onSave: (b: object) => void; onCancel: () => void }) {
  const [v, setV] = useState({ name: cohort.name, term: cohort.term, instrument: cohort.instrument ?? '' });
  return (
    <div className="mt-3 grid gap-3 rounded border border-rule p-3 md:grid-cols-[1fr_1fr_1fr_auto_auto] md:items-end">
      {(['name', 'term', 'instrument'] as const).map((k) => (
        <div key={k}>
          <label htmlFor={`edit-cohort-${k}`} className="label">
            {k[0].toUpperCase() + k.slice(1)}
          </label>
          <input id={`edit-cohort-${k}`} className="field" value={v[k]} onChange={(e) => setV({ ...v, [k]: e.target.value })} />
        </div>
      ))}
      <button type="button" className="btn" onClick={() => onSave(v)}>
        Save cohort
      </button>
      <button type="button" className="btn-quiet" onClick={onCancel}>
        Cancel
      </button>
    </div>
  );
}

function PeopleList({ course, people, onChange }: { course: CourseSummary; people?: People; onChange: () => void }) {
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const { register, handleSubmit, formState, reset } = useForm<StaffAddInput>({
    resolver: zodResolver(staffAddSchema),
    defaultValues: { role: 'ta' },
  });
  async function onAdd(values: StaffAddInput) {
    const r = await api.post<StaffAdded>(`/api/courses/${course.id}/staff`, values);
    if (!r.ok) return setMsg({ ok: false, text: r.error.message });
    setMsg({
      ok: true,
      text: r.data.created
        ? `Added ${values.email} as ${values.role}${r.data.invited ? '; an invitation e-mail is on its way' : ''}.`
        : `${values.email} already holds that role.`,
    });
    reset({ email: '', name: '', role: values.role });
    onChange();
  }
  const cohortOf = (id: number | null) => {
    const c = course.cohorts.find((x) => x.id === id);
    return c ? cohortName(c) : '';
  };
  const columns: ColumnDef<Person, unknown>[] = [
    { accessorKey: 'name', header: 'Name' },
    { accessorKey: 'email', header: 'E-mail' },
    {
      accessorKey: 'studentNumber',
      header: 'Student number',
      cell: ({ getValue }) => <span className="num">{(getValue() as string) ?? ''}</span>,
    },
    { id: 'role', accessorFn: (p) => ROLE_NAMES[p.role as keyof typeof ROLE_NAMES] ?? p.role, header: 'Role' },
    { id: 'cohort', accessorFn: (p) => cohortOf(p.cohortId), header: 'Cohort' },
    { id: 'account', accessorFn: (p) => (p.invited ? 'invited' : 'active'), header: 'Account' },
  ];
  return (
    <section aria-labelledby="people" className="card">
      <h2 id="people" className="mb-3">
        People
      </h2>
      {people ? (
        <DataTable data={people.people} columns={columns} label="People" filterPlaceholder="Filter by name, e-mail, cohort, role…" />
      ) : (
        <p className="text-ink-soft">Loading…</p>
      )}
      <h3 className="mb-2 mt-4">Add staff</h3>
      <form onSubmit={handleSubmit(onAdd)} noValidate className="grid gap-3 md:grid-cols-[1fr_1fr_minmax(13rem,auto)_auto] md:items-end">
        <Field id="staff-email" label="E-mail" error={formState.errors.email?.message}>
          <input type="email" className="field" {...register('email')} />
        </Field>
        <Field id="staff-name" label="Name (for a new account)">
          <input className="field" {...register('name')} />
        </Field>
        <Field id="staff-role" label="Role">
          <select className="field" {...register('role')}>
            <option value="ta">Teaching assistant</option>
            <option value="instructor">Instructor</option>
            <option value="lead">Course lead</option>
          </select>
        </Field>
        <button type="submit" className="btn" disabled={formState.isSubmitting}>
          Add
        </button>
      </form>
      <Status message={msg} />
    </section>
  );
}

function TaDuties({ course, people, onChange }: { course: CourseSummary; people?: People; onChange: () => void }) {
  const [taId, setTaId] = useState('');
  const [cohortId, setCohortId] = useState('');
  const [studentIds, setStudentIds] = useState<number[]>([]);
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const tas = people?.people.filter((p) => p.role === 'ta') ?? [];
  const students = useMemo(
    () => people?.people.filter((p) => p.role === 'student' && String(p.cohortId) === cohortId) ?? [],
    [people, cohortId],
  );
  const nameOf = (id: number | null) => people?.people.find((p) => p.userId === id)?.name ?? `#${id}`;
  async function assign() {
    const r = await api.post(`/api/courses/${course.id}/ta-assignments`, { taId: Number(taId), cohortId: Number(cohortId), studentIds });
    setMsg(r.ok ? { ok: true, text: 'TA assigned.' } : { ok: false, text: r.error.message });
    if (r.ok) {
      setStudentIds([]);
      onChange();
    }
  }
  async function remove(id: number) {
    const r = await api.delete(`/api/courses/${course.id}/ta-assignments/${id}`);
    setMsg(r.ok ? { ok: true, text: 'Assignment removed.' } : { ok: false, text: r.error.message });
    if (r.ok) onChange();
  }
  return (
    <section aria-labelledby="ta-duties" className="card">
      <h2 id="ta-duties" className="mb-3">
        TA duties
      </h2>
      <ul className="mb-3 space-y-1 text-sm">
        {people?.duties.map((d) => {
          const c = course.cohorts.find((x) => x.id === d.cohortId);
          const where = c ? cohortName(c) : 'a cohort no longer listed';
          const text = d.studentId
            ? `${nameOf(d.taId)} marks ${nameOf(d.studentId)} in ${where}`
            : `${nameOf(d.taId)} marks all of ${where}`;
          return (
            <li key={d.id} className="flex flex-wrap items-center gap-2">
              <span>{text}</span>
              <button type="button" className="btn-quiet" onClick={() => remove(d.id)}>
                Remove<span className="sr-only">: {text}</span>
              </button>
            </li>
          );
        })}
        {people && people.duties.length === 0 && <li className="text-ink-soft">No TA has been assigned yet.</li>}
      </ul>
      <div className="grid gap-3 md:grid-cols-3">
        <Field id="duty-ta" label="TA">
          <select className="field" value={taId} onChange={(e) => setTaId(e.target.value)}>
            <option value="">Choose…</option>
            {tas.map((t) => (
              <option key={t.userId} value={t.userId}>
                {t.name}
              </option>
            ))}
          </select>
        </Field>
        <Field id="duty-cohort" label="Cohort">
          <select
            className="field"
            value={cohortId}
            onChange={(e) => {
              setCohortId(e.target.value);
              setStudentIds([]);
            }}
          >
            <option value="">Choose…</option>
            {course.cohorts
              .filter((c) => !c.archived)
              .map((c) => (
                <option key={c.id} value={c.id}>
                  {c.name} ({c.term})
                </option>
              ))}
          </select>
        </Field>
        <Field id="duty-students" label="Students (none chosen: the whole cohort)">
          <select
            multiple
            className="field h-24"
            value={studentIds.map(String)}
            onChange={(e) => setStudentIds(Array.from(e.target.selectedOptions).map((o) => Number(o.value)))}
          >
            {students.map((s) => (
              <option key={s.userId} value={s.userId}>
                {s.name}
              </option>
            ))}
          </select>
        </Field>
      </div>
      <button type="button" className="btn mt-3" disabled={!taId || !cohortId} onClick={assign}>
        Assign TA
      </button>
      <Status message={msg} />
    </section>
  );
}

function Practicals({ course }: { course: CourseSummary }) {
  const router = useRouter();
  const [title, setTitle] = useState('');
  const [species, setSpecies] = useState('H35Cl');
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  async function create() {
    const r = await api.post<PracticalCreated>(`/api/courses/${course.id}/practicals`, {
      title,
      species: species.split(/[,\s]+/).filter(Boolean),
      instructions: '',
      hazardNotes: '',
      mode: 'practice',
      maxAttempts: 3,
      lateRule: 'penalty',
      latePenaltyPerDay: 10,
      latePenaltyCap: 50,
      rubric: [],
      deadlines: [],
    });
    if (!r.ok) return setMsg({ ok: false, text: r.error.message });
    router.push(`/courses/${course.id}/practicals/${r.data.practical.id}`);
  }
  const name = (id: number) => course.cohorts.find((c) => c.id === id)?.name ?? '?';
  return (
    <section aria-labelledby="practicals" className="card">
      <h2 id="practicals" className="mb-3">
        Practicals
      </h2>
      <ul className="mb-4 space-y-2">
        {course.practicals.map((p) => (
          <li key={p.id}>
            <a href={`/courses/${course.id}/practicals/${p.id}`} className="font-bold">
              {p.title}
            </a>{' '}
            <span className="text-sm text-ink-soft">
              {p.species.join(', ')} · {p.mode} ·{' '}
              {p.deadlines.map((d) => `${name(d.cohortId)}: ${formatDate(d.deadline)}`).join('; ') || 'no deadlines set'}
            </span>
          </li>
        ))}
        {course.practicals.length === 0 && <li className="text-ink-soft">No practicals yet.</li>}
      </ul>
      <h3 className="mb-2">New practical</h3>
      <div className="grid gap-3 md:grid-cols-[1fr_14rem_auto] md:items-end">
        <Field id="new-practical-title" label="Title">
          <input className="field" value={title} onChange={(e) => setTitle(e.target.value)} />
        </Field>
        <div>
          <label htmlFor="new-practical-species" className="label">
            Isotopologues
          </label>
          <input
            id="new-practical-species"
            className="field"
            value={species}
            onChange={(e) => setSpecies(e.target.value)}
            aria-describedby="new-practical-species-hint"
          />
          <p id="new-practical-species-hint" className="hint">
            Comma-separated, e.g. H35Cl, D35Cl
          </p>
        </div>
        <button type="button" className="btn" disabled={!title.trim()} onClick={create}>
          Create practical
        </button>
      </div>
      <Status message={msg} />
    </section>
  );
}
