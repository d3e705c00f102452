import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class FeedbackDocument extends Model<InferAttributes<FeedbackDocument>, InferCreationAttributes<FeedbackDocument>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare storedName: string;
  declare sha256: string;
  declare size: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    FeedbackDocument.init(
      {
        id: col.id,
        submissionId: col.fk(),
        storedName: col.str(100),
        sha256: col.str(64),
        size: col.fk(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'FeedbackDocument', tableName: 'feedback_documents' },
    );
  }
}
