import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A course of the learning platform (its "context") connected to one Oscillab course. */
export class LtiContext extends Model<InferAttributes<LtiContext>, InferCreationAttributes<LtiContext>> {
  declare id: CreationOptional<number>;
  declare registrationId: number;
  /** The platform's own id of its course. */
  declare contextId: string;
  declare courseId: number;
  /** The cohort students arriving from the platform join (null: the course's only open cohort). */
  declare defaultCohortId: number | null;
  declare title: string | null;
  /** Service URLs the platform announced in its last instructor or student launch. */
  declare membershipsUrl: string | null;
  declare lineItemsUrl: string | null;
  /** JSON array of the grade-service scopes the platform offered. */
  declare agsScopes: string | null;
  declare rosterSyncedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiContext.init(
      {
        id: col.id,
        registrationId: col.fk(),
        contextId: col.str(255),
        courseId: col.fk(),
        defaultCohortId: col.fk(true),
        title: col.str(300, true),
        membershipsUrl: col.str(1000, true),
        lineItemsUrl: col.str(1000, true),
        agsScopes: col.text(true),
        rosterSyncedAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'LtiContext',
        tableName: 'lti_contexts',
        indexes: [
          { name: 'lti_contexts_registration_context', unique: true, fields: ['registrationId', 'contextId'] },
          { name: 'lti_contexts_course', fields: ['courseId'] },
        ],
      },
    );
  }
}
