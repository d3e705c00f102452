import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A learning platform Oscillab is registered with (one issuer and client id). */
export class LtiRegistration extends Model<InferAttributes<LtiRegistration>, InferCreationAttributes<LtiRegistration>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare issuer: string;
  declare clientId: string;
  declare authLoginUrl: string;
  declare authTokenUrl: string;
  declare keySetUrl: string;
  /** The audience of Oscillab's token-request assertions when the platform wants one other than its token URL. */
  declare tokenAudience: string | null;
  declare active: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiRegistration.init(
      {
        id: col.id,
        name: col.str(200),
        issuer: col.str(500),
        clientId: col.str(255),
        authLoginUrl: col.str(1000),
        authTokenUrl: col.str(1000),
        keySetUrl: col.str(1000),
        tokenAudience: col.str(1000, true),
        active: col.bool(true),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'LtiRegistration',
        tableName: 'lti_registrations',
        indexes: [{ name: 'lti_registrations_issuer_client', unique: true, fields: ['issuer', 'clientId'] }],
      },
    );
  }
}
