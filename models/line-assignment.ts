import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class LineAssignment extends Model<InferAttributes<LineAssignment>, InferCreationAttributes<LineAssignment>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare species: string;
  declare branch: 'P' | 'R' | null;
  declare J: number | null;
  declare wavenumber: number;
  /** 'student' when typed by the student, 'auto' when proposed by the engine and confirmed. */
  declare source: CreationOptional<'student' | 'auto'>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LineAssignment.init(
      {
        id: col.id,
        submissionId: col.fk(),
        species: col.str(40),
        branch: col.str(1, true),
        J: { ...col.fk(true) },
        wavenumber: col.float(false),
        source: { ...col.str(20), defaultValue: 'student' },
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'LineAssignment', tableName: 'line_assignments', indexes: [{ fields: ['submissionId'] }] },
    );
  }
}
