import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export type ToolKeyStatus = 'active' | 'retired';

/** One of Oscillab's own signing key pairs for the learning platform (lib/lti/keys.ts). */
export class LtiToolKey extends Model<InferAttributes<LtiToolKey>, InferCreationAttributes<LtiToolKey>> {
  declare id: CreationOptional<number>;
  declare kid: string;
  /** The public key as a JWK (JSON text), published at the key set URL. */
  declare publicJwk: string;
  declare privateKeyPem: string;
  declare status: CreationOptional<ToolKeyStatus>;
  declare retiredAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiToolKey.init(
      {
        id: col.id,
        kid: { ...col.str(100), unique: true },
        publicJwk: col.text(),
        privateKeyPem: col.text(),
        status: { ...col.str(20), defaultValue: 'active' },
        retiredAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'LtiToolKey', tableName: 'lti_tool_keys' },
    );
  }
}
