import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A practical set for one cohort, with that cohort's deadline. */
export class PracticalCohort extends Model<InferAttributes<PracticalCohort>, InferCreationAttributes<PracticalCohort>> {
  declare id: CreationOptional<number>;
  declare practicalId: number;
  declare cohortId: number;
  declare opensAt: Date | null;
  declare deadline: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    PracticalCohort.init(
      {
        id: col.id,
        practicalId: col.fk(),
        cohortId: col.fk(),
        opensAt: col.date(),
        deadline: col.date(false),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'PracticalCohort',
        tableName: 'practical_cohorts',
        indexes: [{ unique: true, fields: ['practicalId', 'cohortId'] }],
      },
    );
  }
}
