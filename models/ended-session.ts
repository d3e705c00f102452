import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A session ended by signing out (its sid), kept until the session cookie would have expired. */
export class EndedSession extends Model<InferAttributes<EndedSession>, InferCreationAttributes<EndedSession>> {
  declare id: CreationOptional<number>;
  declare sessionId: string;
  declare userId: number | null;
  declare expiresAt: Date;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    EndedSession.init(
      {
        id: col.id,
        sessionId: { ...col.str(64), unique: true },
        userId: col.fk(true),
        expiresAt: col.date(false),
        createdAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'EndedSession',
        tableName: 'ended_sessions',
        updatedAt: false,
        indexes: [{ name: 'ended_sessions_expires_at', fields: ['expiresAt'] }],
      },
    );
  }
}
