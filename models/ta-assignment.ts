import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A TA marks a whole cohort (studentId null) or the named students in it. */
export class TaAssignment extends Model<InferAttributes<TaAssignment>, InferCreationAttributes<TaAssignment>> {
  declare id: CreationOptional<number>;
  declare cohortId: number;
  declare taId: number;
  declare studentId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    TaAssignment.init(
      { id: col.id, cohortId: col.fk(), taId: col.fk(), studentId: col.fk(true), createdAt: col.date(false), updatedAt: col.date(false) },
      {
        sequelize,
        modelName: 'TaAssignment',
        tableName: 'ta_assignments',
        indexes: [{ unique: true, fields: ['cohortId', 'taId', 'studentId'] }],
      },
    );
  }
}
