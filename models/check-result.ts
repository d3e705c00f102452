import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** One judged quantity on one basis (consistency or accuracy) of one submission. */
export class CheckResult extends Model<InferAttributes<CheckResult>, InferCreationAttributes<CheckResult>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare key: string;
  declare species: string;
  declare basis: 'consistency' | 'accuracy';
  declare reportedSI: number | null;
  declare expectedSI: number | null;
  declare deviation: number | null;
  declare relativeDeviation: number | null;
  declare verdict: string;
  /** Comma-separated slip codes, for display; slip_findings holds them one per row. */
  declare slipCodes: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    CheckResult.init(
      {
        id: col.id,
        submissionId: col.fk(),
        key: col.str(40),
        species: col.str(40),
        basis: col.str(20),
        reportedSI: col.float(),
        expectedSI: col.float(),
        deviation: col.float(),
        relativeDeviation: col.float(),
        verdict: col.str(20),
        slipCodes: { ...col.str(400), defaultValue: '' },
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'CheckResult',
        tableName: 'check_results',
        indexes: [
          { fields: ['submissionId'] },
          { fields: ['key', 'basis'] },
          {
            name: 'check_results_statistics_covering',
            fields: ['submissionId', 'key', 'species', 'basis', 'verdict', 'relativeDeviation', 'updatedAt'],
          },
        ],
      },
    );
  }
}
