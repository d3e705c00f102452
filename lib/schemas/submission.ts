/**
 * The shapes a student sends: the draft (autosaved), the submit request and upload fields.
 * Shared by the submission form (react-hook-form + zodResolver) and the route handlers.
 * No server-only imports here.
 */
import './jitless';
import { z } from 'zod';
import { multiLine, oneLine } from './text';

/** More lines than any band has; the line-list parser uses the same limit. */
export const MAX_DRAFT_LINES = 2000;
export const MAX_LINE_TEXT = 400_000;

/** Typed values and pasted lists: tabs and line breaks are text (pasted from spreadsheets), other controls are refused. */
const text = (max: number) => multiLine(z.string().max(max, `At most ${max} characters.`));

/** A number as typed: raw text kept for the significant-figure check. */
export const typedNumberSchema = z.object({
  value: text(60).default(''),
  unit: text(40).default(''),
  uncertainty: text(60).default(''),
});
export type TypedNumberInput = z.infer<typeof typedNumberSchema>;

export const draftLineSchema = z.object({
  branch: z.enum(['P', 'R']).nullable(),
  J: z.number().int().min(0).max(200).nullable(),
  wavenumber: z.number().finite().gt(0, 'A wavenumber must be positive.').lt(100000),
});
export type DraftLine = z.infer<typeof draftLineSchema>;

export const speciesDraftSchema = z.object({
  /** The list as typed or pasted; the source of `lines`. */
  lineText: text(MAX_LINE_TEXT).default(''),
  lines: z.array(draftLineSchema).max(MAX_DRAFT_LINES, `At most ${MAX_DRAFT_LINES} lines; paste the peak positions only.`).default([]),
  bandCentre: typedNumberSchema.default({ value: '', unit: 'cm-1', uncertainty: '' }),
  overtone: typedNumberSchema.optional(),
  /** Derived quantities by quantity key. */
  values: z.record(oneLine(z.string().max(40)), typedNumberSchema).default({}),
});
export type SpeciesDraft = z.infer<typeof speciesDraftSchema>;

export const draftSchema = z.object({
  species: z.record(oneLine(z.string().max(40)), speciesDraftSchema).default({}),
  /** The spectrum (of the practical's first sample, when it takes one per sample). */
  spectrumUploadId: z.number().int().positive().nullable().default(null),
  /** The spectra of the other samples, by sample key, when the practical takes one spectrum per sample. */
  spectra: z.record(z.string().regex(/^[a-z0-9-]{1,40}$/), z.number().int().positive().nullable()).optional(),
  reportUploadId: z.number().int().positive().nullable().default(null),
});
export type Draft = z.infer<typeof draftSchema>;

export const saveDraftSchema = z.object({
  practicalId: z.number().int().positive(),
  draft: draftSchema,
});

export const submitSchema = z.object({
  /** The draft's version the student last saw; a second click with the same version is refused. */
  version: z.number().int().min(0),
  draft: draftSchema,
});

export const UPLOAD_KINDS = ['spectrum', 'report'] as const;
/** Which of the practical's spectra an upload is (a sample key). */
export const sampleKeySchema = z.string().regex(/^[a-z0-9-]{1,40}$/, 'A sample is named by lower-case letters, digits and dashes.');
export type UploadKind = (typeof UPLOAD_KINDS)[number];

export function emptyDraft(species: string[]): Draft {
  return {
    species: Object.fromEntries(
      species.map((s) => [s, { lineText: '', lines: [], bandCentre: { value: '', unit: 'cm-1', uncertainty: '' }, values: {} }]),
    ),
    spectrumUploadId: null,
    reportUploadId: null,
  };
}
