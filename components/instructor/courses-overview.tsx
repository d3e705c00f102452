'use client';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { courseCreateSchema, type CourseCreateInput } from '@/lib/schemas/instructor';
import { DataTable } from './data-table';
import { api } from '@/lib/api-client';
import type { CourseCreated } from '@/lib/instructor/courses';
import { Field } from '@/components/ui/field';

export type CourseSummary = {
  id: number;
  code: string;
  title: string;
  archived: boolean;
  cohorts: { id: number; name: string; term: string; instrument: string | null; archived: boolean }[];
  practicals: {
    id: number;
    title: string;
    species: string[];
    mode: string;
    archived: boolean;
    deadlines: { cohortId: number; deadline: string }[];
  }[];
};

type PracticalRow = {
  courseId: number;
  course: string;
  id: number;
  title: string;
  species: string;
  mode: string;
  cohorts: string;
  next: string;
};

export const formatDate = (iso: string) =>
  new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC' }) + ' UTC';

export function CoursesOverview({ courses }: { courses: CourseSummary[] }) {
  const rows: PracticalRow[] = courses.flatMap((c) =>
    c.practicals.map((p) => ({
      courseId: c.id,
      course: c.code,
      id: p.id,
      title: p.title,
      species: p.species.join(', '),
      mode: p.mode,
      cohorts: p.deadlines
        .map((d) => {
          const h = c.cohorts.find((x) => x.id === d.cohortId);
          return h ? `${h.name} (${h.term})` : '?';
        })
        .join(', '),
      next: p.deadlines.map((d) => d.deadline).sort()[0] ?? '',
    })),
  );
  const columns: ColumnDef<PracticalRow, unknown>[] = [
    { accessorKey: 'course', header: 'Course' },
    {
      accessorKey: 'title',
      header: 'Practical',
      cell: ({ row }) => <a href={`/courses/${row.original.courseId}/practicals/${row.original.id}`}>{row.original.title}</a>,
    },
    { accessorKey: 'species', header: 'Isotopologues' },
    { accessorKey: 'mode', header: 'Mode' },
    { accessorKey: 'cohorts', header: 'Cohorts' },
    {
      accessorKey: 'next',
      header: 'First deadline',
      cell: ({ getValue }) => (getValue() ? <span className="num">{formatDate(String(getValue()))}</span> : '—'),
    },
  ];
  return (
    <div className="space-y-6">
      <section aria-labelledby="my-courses" className="card">
        <h2 id="my-courses" className="mb-3">
          Your courses
        </h2>
        {courses.length === 0 && <p className="text-ink-soft">You do not set up any course yet.</p>}
        <ul className="grid gap-3 md:grid-cols-2">
          {courses.map((c) => (
            <li key={c.id} className="rounded border border-rule p-3">
              <h3>
                <a href={`/courses/${c.id}`}>
                  {c.code} · {c.title}
                </a>
                {c.archived && <span className="ml-2 text-sm text-ink-soft">(archived)</span>}
              </h3>
              <p className="text-sm text-ink-soft">
                {c.cohorts
                  .filter((h) => !h.archived)
                  .map((h) => `${h.name} (${h.term})`)
                  .join(', ') || 'No cohorts yet'}{' '}
                · {c.practicals.length} practical(s)
              </p>
            </li>
          ))}
        </ul>
      </section>
      <section aria-labelledby="all-practicals" className="card">
        <h2 id="all-practicals" className="mb-3">
          Practicals
        </h2>
        <DataTable data={rows} columns={columns} label="Practicals" filterPlaceholder="Filter by course, title, isotopologue…" />
      </section>
      <NewCourse />
    </div>
  );
}

function NewCourse() {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError } = useForm<CourseCreateInput>({ resolver: zodResolver(courseCreateSchema) });
  async function onSubmit(values: CourseCreateInput) {
    const r = await api.post<CourseCreated>('/api/courses', values);
    if (!r.ok) {
      for (const [k, v] of Object.entries(r.error.fields)) setError(k as keyof CourseCreateInput, { message: v[0] });
      setMessage(r.error.message);
      return;
    }
    router.push(`/courses/${r.data.course.id}`);
  }
  return (
    <section aria-labelledby="new-course" className="card">
      <h2 id="new-course" className="mb-3">
        New course
      </h2>
      <form onSubmit={handleSubmit(onSubmit)} noValidate className="grid gap-3 md:grid-cols-[10rem_minmax(0,1fr)_auto] md:items-end">
        <Field id="course-code" label="Code" error={formState.errors.code?.message}>
          <input className="field" {...register('code')} />
        </Field>
        <Field id="course-title" label="Title" error={formState.errors.title?.message}>
          <input className="field" {...register('title')} />
        </Field>
        <button className="btn" type="submit" disabled={formState.isSubmitting}>
          Create course
        </button>
      </form>
      <p aria-live="polite" className="error-text">
        {message}
      </p>
    </section>
  );
}
