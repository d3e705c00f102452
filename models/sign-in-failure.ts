import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** Failed sign-ins counted per subject ("account:<email>" or "address:<ip>"). */
export class SignInFailure extends Model<InferAttributes<SignInFailure>, InferCreationAttributes<SignInFailure>> {
  declare id: CreationOptional<number>;
  declare subject: string;
  declare failures: CreationOptional<number>;
  declare firstFailureAt: Date;
  declare blockedUntil: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SignInFailure.init(
      {
        id: col.id,
        subject: { ...col.str(300), unique: true },
        failures: col.int(0),
        firstFailureAt: col.date(false),
        blockedUntil: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'SignInFailure', tableName: 'sign_in_failures' },
    );
  }
}
