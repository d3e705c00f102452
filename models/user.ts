import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string;
  declare passwordHash: string | null;
  declare isAdmin: CreationOptional<boolean>;
  /** Carried in session tokens; raising it ends every session signed in before (lib/auth/session.ts). */
  declare sessionVersion: CreationOptional<number>;
  declare studentNumber: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    User.init(
      {
        id: col.id,
        email: { ...col.str(254), unique: true },
        name: col.str(200),
        passwordHash: col.str(100, true),
        isAdmin: col.bool(false),
        sessionVersion: col.int(0),
        studentNumber: col.str(40, true),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'User', tableName: 'users' },
    );
  }
}
