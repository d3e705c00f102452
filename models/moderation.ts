import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class Moderation extends Model<InferAttributes<Moderation>, InferCreationAttributes<Moderation>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare moderatorId: number;
  declare markerId: number | null;
  declare decision: 'confirmed' | 'changed';
  declare totalBefore: number | null;
  declare totalAfter: number | null;
  declare note: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Moderation.init(
      {
        id: col.id,
        submissionId: col.fk(),
        moderatorId: col.fk(),
        markerId: col.fk(true),
        decision: col.str(20),
        totalBefore: col.float(),
        totalAfter: col.float(),
        note: col.text(true),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'Moderation',
        tableName: 'moderations',
        indexes: [{ name: 'moderations_statistics_covering', fields: ['submissionId', 'markerId', 'decision', 'updatedAt'] }],
      },
    );
  }
}
