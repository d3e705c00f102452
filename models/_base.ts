import { DataTypes } from 'sequelize';

/**
 * Column shorthands shared by the model files. The tables themselves are defined in migrations/;
 * each model mirrors its table's columns and indexes, and tests/integration/schema-drift.test.ts
 * fails when the two differ.
 */
export const col = {
  id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
  fk: (allowNull = false) => ({ type: DataTypes.INTEGER, allowNull }),
  str: (len: number, allowNull = false) => ({ type: DataTypes.STRING(len), allowNull }),
  text: (allowNull = false) => ({ type: DataTypes.TEXT, allowNull }),
  int: (defaultValue = 0) => ({ type: DataTypes.INTEGER, allowNull: false, defaultValue }),
  float: (allowNull = true) => ({ type: DataTypes.FLOAT, allowNull }),
  bool: (defaultValue = false) => ({ type: DataTypes.BOOLEAN, allowNull: false, defaultValue }),
  date: (allowNull = true) => ({ type: DataTypes.DATE, allowNull }),
  json: (allowNull = true) => ({ type: DataTypes.JSON, allowNull }),
};
