/**
 * Forms of the instructor workspace. The same schemas validate the forms in the browser
 * (react-hook-form + zodResolver) and the bodies of the route handlers, so nothing here may
 * import server-only code.
 */
import './jitless';
import { z } from 'zod';
import { QUANTITY_KEYS } from '@/lib/grading/quantities';
import { parseSpecies } from '@/lib/grading/species';
import { multiLine, oneLine } from './text';
import { instructionsProblem } from './instructions';

/** One-line text (titles, names): control characters and line breaks refused (lib/schemas/text.ts). */
const text = (max: number) => oneLine(z.string().trim().min(1, 'Required.').max(max, `At most ${max} characters.`));
const optionalText = (max: number) => oneLine(z.string().trim().max(max, `At most ${max} characters.`));
/** Multi-line text (instructions, notes, guidance): line breaks and tabs allowed, other controls refused. */
const longText = (max: number) => multiLine(z.string().trim().max(max, `At most ${max} characters.`));
const id = z.number().int().positive().max(Number.MAX_SAFE_INTEGER);

export const courseCreateSchema = z.object({
  code: z
    .string()
    .trim()
    .min(2, 'At least 2 characters.')
    .max(40)
    .regex(/^[A-Za-z0-9_-]+$/, 'Letters, digits, - and _ only.'),
  title: text(200),
});
export type CourseCreateInput = z.infer<typeof courseCreateSchema>;

export const courseUpdateSchema = z.object({
  title: text(200).optional(),
  archived: z.boolean().optional(),
});

export const cohortCreateSchema = z.object({
  name: text(120),
  term: text(60),
  instrument: optionalText(120).optional(),
});
export type CohortCreateInput = z.infer<typeof cohortCreateSchema>;

export const cohortUpdateSchema = z.object({
  name: text(120).optional(),
  term: text(60).optional(),
  instrument: optionalText(120).optional(),
  archived: z.boolean().optional(),
});

export const STAFF_ROLES = ['ta', 'instructor', 'lead'] as const;
export const staffAddSchema = z.object({
  email: z.string().trim().toLowerCase().email('Not an e-mail address.').max(254),
  role: z.enum(STAFF_ROLES, { message: 'Role must be ta, instructor or lead.' }),
  name: optionalText(200).optional(),
});
export type StaffAddInput = z.infer<typeof staffAddSchema>;

export const taAssignmentSchema = z.object({
  taId: id,
  cohortId: id,
  /** Empty: the whole cohort; otherwise the named students of that cohort. */
  studentIds: z.array(id).max(500).default([]),
});
export type TaAssignmentInput = z.input<typeof taAssignmentSchema>;

const speciesText = z
  .string()
  .trim()
  .min(1)
  .max(40)
  .refine((s) => parseSpecies(s).ok, { message: 'Not a diatomic isotopologue the engine knows (e.g. H35Cl, D35Cl, 12C16O).' });

export const RUBRIC_ITEM = z.object({
  key: z
    .string()
    .trim()
    .min(1)
    .max(60)
    .regex(/^[a-z0-9-]+$/, 'Lower-case letters, digits and - only.'),
  title: text(200),
  marks: z.number().min(0).max(1000),
  guidance: longText(2000).default(''),
});

export const practicalSchema = z
  .object({
    title: text(200),
    species: z.array(speciesText).min(1, 'Give at least one isotopologue.').max(6),
    instructions: longText(50_000)
      .refine((s) => instructionsProblem(s) === null, {
        error: (i) => instructionsProblem(String(i.input)) ?? 'The instructions cannot be shown.',
      })
      .default(''),
    hazardNotes: longText(5_000).default(''),
    mode: z.enum(['practice', 'assessed']),
    maxAttempts: z.number().int().min(1, 'At least 1.').max(20, 'At most 20.'),
    lateRule: z.enum(['penalty', 'not-accepted', 'none']),
    latePenaltyPerDay: z.number().min(0).max(100),
    latePenaltyCap: z.number().min(0).max(100),
    rubric: z.array(RUBRIC_ITEM).max(30).default([]),
    deadlines: z
      .array(
        z.object({
          cohortId: id,
          deadline: z
            .string()
            .min(1, 'Required.')
            .refine((s) => !Number.isNaN(Date.parse(s)), 'Not a date.'),
        }),
      )
      .max(50)
      .default([]),
  })
  .refine((p) => p.lateRule !== 'penalty' || p.latePenaltyCap >= p.latePenaltyPerDay || p.latePenaltyCap === 0, {
    message: 'The cap must be at least the penalty per day.',
    path: ['latePenaltyCap'],
  });
export type PracticalInput = z.input<typeof practicalSchema>;
export type PracticalData = z.output<typeof practicalSchema>;

export const quantitySchema = z
  .object({
    key: z.enum(QUANTITY_KEYS, { message: 'Not a quantity the grading engine knows.' }),
    species: speciesText,
    unit: oneLine(z.string().trim().max(40)),
    marks: z.number().min(0).max(1000),
    uncertaintyRequired: z.boolean(),
    referenceKind: z.enum(['literature', 'department']),
    /** Department value in `unit` (not SI: the form shows what the instructor typed). */
    referenceValue: z.number().finite().nullable().optional(),
    referenceNote: longText(1000).nullable().optional(),
    position: z.number().int().min(0).max(1000).optional(),
  })
  .refine((q) => q.referenceKind === 'literature' || (typeof q.referenceValue === 'number' && !!q.referenceNote?.trim()), {
    message: 'A department value needs the value and a note saying where it comes from.',
    path: ['referenceValue'],
  });
export type QuantityInput = z.input<typeof quantitySchema>;

export const BAND_KINDS = ['absolute', 'relative', 'sigma'] as const;
export const BAND_BASES = ['consistency', 'accuracy'] as const;

export const bandSchema = z
  .object({
    quantityDefinitionId: id,
    /** null: the course-wide default; otherwise an override for that cohort. */
    cohortId: id.nullable(),
    basis: z.enum(BAND_BASES),
    kind: z.enum(BAND_KINDS),
    /** absolute: in `unit`; relative: a fraction (0.005 = 0.5 %); sigma: a multiple of the standard uncertainty. */
    inner: z.number().finite().positive('Must be greater than zero.'),
    outer: z.number().finite().positive().nullable().optional(),
    unit: oneLine(z.string().trim().max(40)).nullable().optional(),
    /** When submissions exist: true re-checks them with the new band, false keeps their results. */
    recheck: z.boolean().optional(),
  })
  .refine((b) => b.outer == null || b.outer >= b.inner, {
    message: 'The outer band must be at least as wide as the inner band.',
    path: ['outer'],
  })
  .refine((b) => b.kind !== 'absolute' || !!b.unit?.trim(), { message: 'An absolute band needs a unit.', path: ['unit'] });
export type BandInput = z.input<typeof bandSchema>;

export const bandDeleteSchema = z.object({ bandId: id, recheck: z.boolean().optional() });

export const previewSchema = z.object({
  quantityDefinitionId: id,
  cohortId: id.nullable(),
  value: z.number().finite(),
  unit: oneLine(z.string().trim().max(40)),
  uncertainty: z.number().finite().positive().nullable().optional(),
  /** What the engine would recompute from the student's own data, for the consistency band. */
  recomputed: z.number().finite().nullable().optional(),
});
export type PreviewInput = z.input<typeof previewSchema>;

export const copySchema = z.object({
  title: text(200),
  /** Each cohort override of the source practical: the cohort it moves to, or null to drop it. */
  cohortMap: z.record(z.string().regex(/^\d+$/), id.nullable()).default({}),
  deadlines: z
    .array(z.object({ cohortId: id, deadline: z.string().refine((s) => !Number.isNaN(Date.parse(s)), 'Not a date.') }))
    .max(50)
    .default([]),
});
export type CopyInput = z.input<typeof copySchema>;

export const welcomeSchema = z
  .object({
    token: z.string().min(20).max(200),
    password: z.string().max(200),
    confirm: z.string().max(200),
  })
  .refine((w) => w.password === w.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

/** The spectra a practical takes and the third comparison's switch (lib/submissions/spectrum-analysis.ts). */
export const spectrumSampleSchema = z.object({
  key: z
    .string()
    .trim()
    .min(1)
    .max(40)
    .regex(/^[a-z0-9-]+$/, 'Lower-case letters, digits and - only.'),
  label: text(80),
  molecules: z
    .array(
      z
        .string()
        .trim()
        .min(1)
        .max(40)
        .regex(/^[A-Za-z0-9()\s\-^⁰¹²³⁴⁵⁶⁷⁸⁹]+$/u, 'Write a molecule with letters and digits only, like HCl, DCl or H35Cl.'),
    )
    .min(1, 'Name at least one molecule (e.g. HCl).')
    .max(4),
  bands: z
    .array(z.enum(['fundamental', 'overtone']))
    .min(1, 'Expect at least one band.')
    .max(2),
});

export const spectrumSettingsSchema = z.object({
  spectrumAnalysis: z.boolean(),
  /** null: one spectrum holding every molecule of the practical. */
  samples: z.array(spectrumSampleSchema).min(1).max(6).nullable(),
});
export type SpectrumSettingsData = z.output<typeof spectrumSettingsSchema>;
