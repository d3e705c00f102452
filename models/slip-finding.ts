import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class SlipFinding extends Model<InferAttributes<SlipFinding>, InferCreationAttributes<SlipFinding>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare key: string;
  declare code: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SlipFinding.init(
      { id: col.id, submissionId: col.fk(), key: col.str(40), code: col.str(60), createdAt: col.date(false), updatedAt: col.date(false) },
      {
        sequelize,
        modelName: 'SlipFinding',
        tableName: 'slip_findings',
        indexes: [
          { fields: ['code'] },
          { fields: ['submissionId'] },
          { name: 'slip_findings_statistics_covering', fields: ['submissionId', 'code', 'key'] },
        ],
      },
    );
  }
}
