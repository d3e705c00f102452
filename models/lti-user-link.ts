import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A platform user (its stable `sub`) and the one Oscillab account it signs in as. */
export class LtiUserLink extends Model<InferAttributes<LtiUserLink>, InferCreationAttributes<LtiUserLink>> {
  declare id: CreationOptional<number>;
  declare registrationId: number;
  declare sub: string;
  declare userId: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiUserLink.init(
      { id: col.id, registrationId: col.fk(), sub: col.str(255), userId: col.fk(), createdAt: col.date(false), updatedAt: col.date(false) },
      {
        sequelize,
        modelName: 'LtiUserLink',
        tableName: 'lti_user_links',
        indexes: [
          { name: 'lti_user_links_registration_sub', unique: true, fields: ['registrationId', 'sub'] },
          { name: 'lti_user_links_registration_user', unique: true, fields: ['registrationId', 'userId'] },
        ],
      },
    );
  }
}
