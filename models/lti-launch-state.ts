import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A login initiation: the hash of its state (the browser holds the state in a cookie) and its single-use nonce. */
export class LtiLaunchState extends Model<InferAttributes<LtiLaunchState>, InferCreationAttributes<LtiLaunchState>> {
  declare id: CreationOptional<number>;
  declare stateHash: string;
  declare nonce: string;
  declare registrationId: number;
  declare expiresAt: Date;
  declare usedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiLaunchState.init(
      {
        id: col.id,
        stateHash: { ...col.str(64), unique: true },
        nonce: { ...col.str(64), unique: true },
        registrationId: col.fk(),
        expiresAt: col.date(false),
        usedAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'LtiLaunchState',
        tableName: 'lti_launch_states',
        indexes: [{ name: 'lti_launch_states_expires', fields: ['expiresAt'] }],
      },
    );
  }
}
