import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A deployment id of a registration; launches naming any other deployment are refused. */
export class LtiDeployment extends Model<InferAttributes<LtiDeployment>, InferCreationAttributes<LtiDeployment>> {
  declare id: CreationOptional<number>;
  declare registrationId: number;
  declare deploymentId: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiDeployment.init(
      { id: col.id, registrationId: col.fk(), deploymentId: col.str(255), createdAt: col.date(false), updatedAt: col.date(false) },
      {
        sequelize,
        modelName: 'LtiDeployment',
        tableName: 'lti_deployments',
        indexes: [{ name: 'lti_deployments_registration_deployment', unique: true, fields: ['registrationId', 'deploymentId'] }],
      },
    );
  }
}
