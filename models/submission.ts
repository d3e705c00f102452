import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export const SUBMISSION_STATUSES = ['draft', 'submitted', 'marked', 'released', 'resubmission-requested'] as const;
export type SubmissionStatus = (typeof SUBMISSION_STATUSES)[number];

export class Submission extends Model<InferAttributes<Submission>, InferCreationAttributes<Submission>> {
  declare id: CreationOptional<number>;
  declare practicalId: number;
  declare cohortId: number;
  declare studentId: number;
  /** 0 while a draft; 1, 2, … once submitted. */
  declare attempt: CreationOptional<number>;
  declare status: CreationOptional<SubmissionStatus>;
  declare draft: unknown;
  declare submittedAt: Date | null;
  declare daysLate: CreationOptional<number>;
  declare latePenalty: CreationOptional<number>;
  declare isMarkedAttempt: CreationOptional<boolean>;
  /** The engine's whole result (checkSubmission output plus spectrum comparison). */
  declare checkSummary: unknown;
  declare lineListHash: string | null;
  declare flagOutside: CreationOptional<boolean>;
  declare flagSlip: CreationOptional<boolean>;
  declare flagLate: CreationOptional<boolean>;
  declare flagDuplicate: CreationOptional<boolean>;
  declare flagSpectrumMismatch: CreationOptional<boolean>;
  declare proposedTotal: number | null;
  declare awardedTotal: number | null;
  declare maxTotal: number | null;
  declare markedById: number | null;
  declare markedAt: Date | null;
  declare releasedAt: Date | null;
  declare extraAttempts: CreationOptional<number>;
  declare resubmissionMessage: string | null;
  /** The marker's overall comment, printed in the feedback (migration 20261201000600). */
  declare markerComment: CreationOptional<string | null>;
  /** What the queue shows, kept when the submission is checked (migration 20261202200100): verdict counts over its check results… */
  declare verdictsWithin: CreationOptional<number>;
  declare verdictsPartial: CreationOptional<number>;
  declare verdictsOutside: CreationOptional<number>;
  declare verdictsNotChecked: CreationOptional<number>;
  /** …and the codes of its named slips, comma-separated. */
  declare slipCodes: CreationOptional<string>;
  /** Optimistic-lock counter: a save names the version it started from. */
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Submission.init(
      {
        id: col.id,
        practicalId: col.fk(),
        cohortId: col.fk(),
        studentId: col.fk(),
        attempt: col.int(0),
        status: { ...col.str(30), defaultValue: 'draft' },
        draft: col.json(),
        submittedAt: col.date(),
        daysLate: col.int(0),
        latePenalty: { ...col.float(false), defaultValue: 0 },
        isMarkedAttempt: col.bool(true),
        checkSummary: col.json(),
        lineListHash: col.str(64, true),
        flagOutside: col.bool(),
        flagSlip: col.bool(),
        flagLate: col.bool(),
        flagDuplicate: col.bool(),
        flagSpectrumMismatch: col.bool(),
        proposedTotal: col.float(),
        awardedTotal: col.float(),
        maxTotal: col.float(),
        markedById: col.fk(true),
        markedAt: col.date(),
        releasedAt: col.date(),
        extraAttempts: col.int(0),
        resubmissionMessage: col.text(true),
        markerComment: col.text(true),
        version: col.int(0),
        verdictsWithin: col.int(0),
        verdictsPartial: col.int(0),
        verdictsOutside: col.int(0),
        verdictsNotChecked: col.int(0),
        slipCodes: { ...col.str(400), defaultValue: '' },
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'Submission',
        tableName: 'submissions',
        indexes: [
          { unique: true, fields: ['practicalId', 'studentId', 'attempt'] },
          { fields: ['cohortId', 'status'] },
          { fields: ['lineListHash'] },
          // Cohort statistics (migrations/20261201000700-statistics-indexes.cjs).
          {
            name: 'submissions_statistics_scope',
            fields: ['practicalId', 'isMarkedAttempt', 'cohortId', 'status', 'submittedAt', 'studentId'],
          },
          // The marking queue's filters and keyset pages (migrations/20261202200100-queue-summary.cjs).
          { name: 'submissions_queue_practical', fields: ['practicalId', 'isMarkedAttempt', 'submittedAt', 'id'] },
          { name: 'submissions_queue_cohort', fields: ['cohortId', 'isMarkedAttempt', 'submittedAt', 'id'] },
          { name: 'submissions_practical_cohort_updated', fields: ['practicalId', 'cohortId', 'updatedAt'] },
        ],
      },
    );
  }
}
