import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** Marks for one item: a quantity ("forceConstant:H35Cl:accuracy") or a hand-marked rubric item ("rubric:discussion"). */
export class Mark extends Model<InferAttributes<Mark>, InferCreationAttributes<Mark>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare itemKey: string;
  declare label: string;
  declare maxMarks: number;
  /** What the engine proposes from the tolerance bands (null for hand-marked items). */
  declare proposed: number | null;
  declare awarded: number | null;
  declare comment: string | null;
  declare markerId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Mark.init(
      {
        id: col.id,
        submissionId: col.fk(),
        itemKey: col.str(100),
        label: col.str(200),
        maxMarks: col.float(false),
        proposed: col.float(),
        awarded: col.float(),
        comment: col.text(true),
        markerId: col.fk(true),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'Mark',
        tableName: 'marks',
        indexes: [
          { unique: true, fields: ['submissionId', 'itemKey'] },
          { name: 'marks_submission_updated', fields: ['submissionId', 'updatedAt'] },
        ],
      },
    );
  }
}
