/** Zod schemas shared by the marking forms and their route handlers (no server-only imports). */
import './jitless';
import { z } from 'zod';
import { multiLine, oneLine } from './text';

export const QUEUE_STATUSES = ['submitted', 'marked', 'released', 'resubmission-requested'] as const;
export const QUEUE_FLAGS = ['outside', 'slip', 'late', 'duplicate', 'spectrum'] as const;
export const QUEUE_SORTS = ['submittedAt', 'student', 'practical', 'status', 'proposedTotal', 'awardedTotal'] as const;

const optionalId = z.preprocess(
  (v) => (v === '' || v === null ? undefined : v),
  z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER).optional(),
);
const optionalEnum = <T extends readonly [string, ...string[]]>(values: T) =>
  z.preprocess((v) => (v === '' || v === null ? undefined : v), z.enum(values).optional());

export const queueQuerySchema = z.object({
  practicalId: optionalId,
  cohortId: optionalId,
  status: optionalEnum(QUEUE_STATUSES),
  flag: optionalEnum(QUEUE_FLAGS),
  sort: optionalEnum(QUEUE_SORTS).default('submittedAt'),
  dir: optionalEnum(['asc', 'desc'] as const).default('asc'),
  page: z.preprocess((v) => (v === '' || v === null ? undefined : v), z.coerce.number().int().min(1).max(100000).default(1)),
  pageSize: z.preprocess((v) => (v === '' || v === null ? undefined : v), z.coerce.number().int().min(1).max(100).default(25)),
  /** Keyset cursors from the previous answer's `next` / `prev`: the page after or before that row. */
  after: z.preprocess(
    (v) => (v === '' || v === null ? undefined : v),
    z
      .string()
      .max(600)
      .regex(/^[A-Za-z0-9_-]+$/, 'Not a page link.')
      .optional(),
  ),
  before: z.preprocess(
    (v) => (v === '' || v === null ? undefined : v),
    z
      .string()
      .max(600)
      .regex(/^[A-Za-z0-9_-]+$/, 'Not a page link.')
      .optional(),
  ),
});
export type QueueQuery = z.infer<typeof queueQuerySchema>;

const marks = z.number({ error: 'Enter the marks as a number.' }).finite().min(0, 'Marks cannot be negative.').max(1000);

export const markItemSchema = z.object({
  itemKey: oneLine(z.string().min(1).max(100)),
  /** null: not marked yet (a hand-marked item the TA has not reached). */
  awarded: marks.nullable(),
  comment: multiLine(z.string().trim().max(2000, 'At most 2000 characters.')).optional().nullable(),
});

export const saveMarksSchema = z.object({
  version: z.number().int().min(0),
  items: z.array(markItemSchema).max(200),
  markerComment: multiLine(z.string().trim().max(5000, 'At most 5000 characters.')).optional().nullable(),
});
export type SaveMarksInput = z.infer<typeof saveMarksSchema>;

export const acceptSchema = z.object({ version: z.number().int().min(0) });

export const releaseSchema = z.object({
  submissionIds: z.array(z.number().int().positive().max(Number.MAX_SAFE_INTEGER)).min(1, 'Choose at least one submission.').max(500),
});

export const resubmissionSchema = z.object({
  version: z.number().int().min(0).optional(),
  message: multiLine(z.string().trim().min(1, 'Write a message to the student.').max(5000, 'At most 5000 characters.')),
});

export const resendSchema = z.object({ outboxId: z.number().int().positive().max(Number.MAX_SAFE_INTEGER) });

export const moderationSchema = z
  .object({
    decision: z.enum(['confirmed', 'changed']),
    version: z.number().int().min(0),
    items: z
      .array(z.object({ itemKey: oneLine(z.string().min(1).max(100)), awarded: marks }))
      .max(200)
      .default([]),
    note: multiLine(z.string().trim().max(5000)).optional().nullable(),
  })
  .refine((v) => v.decision === 'confirmed' || (v.note && v.note.length > 0), {
    message: 'Say why the marks were changed.',
    path: ['note'],
  });
