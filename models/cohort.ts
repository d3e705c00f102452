import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class Cohort extends Model<InferAttributes<Cohort>, InferCreationAttributes<Cohort>> {
  declare id: CreationOptional<number>;
  declare courseId: number;
  declare name: string;
  declare term: string;
  declare instrument: string | null;
  declare archivedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Cohort.init(
      {
        id: col.id,
        courseId: col.fk(),
        name: col.str(120),
        term: col.str(60),
        instrument: col.str(120, true),
        archivedAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'Cohort', tableName: 'cohorts', indexes: [{ unique: true, fields: ['courseId', 'name', 'term'] }] },
    );
  }
}
