import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';
import type { OutboxStatus } from './email-outbox';

/** A score waiting to go to the platform's gradebook, queued in the release's own transaction. */
export class LtiScoreOutbox extends Model<InferAttributes<LtiScoreOutbox>, InferCreationAttributes<LtiScoreOutbox>> {
  declare id: CreationOptional<number>;
  /** "score:<submission>:<release n>:<context>": one row per release and platform course. */
  declare dedupeKey: string;
  declare ltiContextId: number;
  declare practicalId: number;
  declare submissionId: number;
  declare userId: number;
  declare platformUserId: string;
  declare scoreGiven: number;
  declare scoreMaximum: number;
  declare comment: string | null;
  /** The score's timestamp, fixed when queued, so a repeated delivery is recognisably the same score. */
  declare scoredAt: Date;
  declare lineItemUrl: string | null;
  declare status: CreationOptional<OutboxStatus>;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date;
  declare lockedUntil: Date | null;
  declare lastError: string | null;
  declare sentAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiScoreOutbox.init(
      {
        id: col.id,
        dedupeKey: { ...col.str(200), unique: true },
        ltiContextId: col.fk(),
        practicalId: col.fk(),
        submissionId: col.fk(),
        userId: col.fk(),
        platformUserId: col.str(255),
        scoreGiven: col.float(false),
        scoreMaximum: col.float(false),
        comment: col.text(true),
        scoredAt: col.date(false),
        lineItemUrl: col.str(1000, true),
        status: { ...col.str(20), defaultValue: 'queued' },
        attempts: col.int(0),
        nextAttemptAt: col.date(false),
        lockedUntil: col.date(),
        lastError: col.text(true),
        sentAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'LtiScoreOutbox',
        tableName: 'lti_score_outbox',
        indexes: [
          { name: 'lti_score_outbox_due', fields: ['status', 'nextAttemptAt'] },
          { name: 'lti_score_outbox_submission', fields: ['submissionId'] },
        ],
      },
    );
  }
}
