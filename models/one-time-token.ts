import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class OneTimeToken extends Model<InferAttributes<OneTimeToken>, InferCreationAttributes<OneTimeToken>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare purpose: 'invitation' | 'password-reset';
  /** SHA-256 of the token in the link; the token itself is never stored. */
  declare tokenHash: string;
  declare expiresAt: Date;
  declare usedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    OneTimeToken.init(
      {
        id: col.id,
        userId: col.fk(),
        purpose: col.str(20),
        tokenHash: { ...col.str(64), unique: true },
        expiresAt: col.date(false),
        usedAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'OneTimeToken', tableName: 'one_time_tokens' },
    );
  }
}
