import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export type OutboxStatus = 'queued' | 'sending' | 'sent' | 'failed';

/** Mail waiting to go out. Rows are written in the same transaction as the change they announce. */
export class EmailOutbox extends Model<InferAttributes<EmailOutbox>, InferCreationAttributes<EmailOutbox>> {
  declare id: CreationOptional<number>;
  /** One row per logical message (e.g. "release:42:v1"): the same release never queues twice. */
  declare dedupeKey: string;
  declare toAddress: string;
  declare subject: string;
  declare textBody: string;
  declare htmlBody: string | null;
  declare feedbackDocumentId: number | null;
  declare submissionId: number | null;
  declare status: CreationOptional<OutboxStatus>;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date;
  declare lockedUntil: Date | null;
  declare lastError: string | null;
  declare messageId: string | null;
  declare sentAt: Date | null;
  /** When staff last asked for it to be sent again (one resend per row within RESEND_WINDOW_MS). */
  declare resentAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    EmailOutbox.init(
      {
        id: col.id,
        dedupeKey: { ...col.str(200), unique: true },
        toAddress: col.str(254),
        subject: col.str(300),
        textBody: col.text(),
        htmlBody: col.text(true),
        feedbackDocumentId: col.fk(true),
        submissionId: col.fk(true),
        status: { ...col.str(20), defaultValue: 'queued' },
        attempts: col.int(0),
        nextAttemptAt: col.date(false),
        lockedUntil: col.date(),
        lastError: col.text(true),
        messageId: col.str(300, true),
        sentAt: col.date(),
        resentAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'EmailOutbox',
        tableName: 'email_outbox',
        indexes: [{ fields: ['status', 'nextAttemptAt'] }, { name: 'email_outbox_submission', fields: ['submissionId', 'id'] }],
      },
    );
  }
}
