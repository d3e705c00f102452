/**
 * The kept statistics tables (migration 20261202200000-kept-statistics). Written and read with
 * plain SQL by lib/statistics/keep.ts and queries.ts; these models mirror the schema for
 * inspection and tests. Exact sums are text (lib/statistics/exact.ts); no timestamps.
 */
import { DataTypes, Model, type Sequelize } from 'sequelize';
import { col } from './_base';

const exact = { type: DataTypes.TEXT, allowNull: false, defaultValue: '0:0' };
const count = col.int(0);
const cell = { practicalId: col.fk(), cohortId: col.fk() };

export class StatisticsSubmission extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsSubmission.init(
      {
        submissionId: { type: DataTypes.INTEGER, primaryKey: true }, ...cell, studentId: col.fk(),
        spans: col.bool(), late: col.bool(), marked: col.bool(), released: col.bool(), markedById: col.fk(true),
        markPercent: col.float(), differencePercent: col.float(), overrides: count, moderations: { ...col.text(), defaultValue: '' },
      },
      { sequelize, modelName: 'StatisticsSubmission', tableName: 'statistics_submissions', timestamps: false },
    );
  }
}

export class StatisticsValue extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsValue.init(
      {
        id: col.id, submissionId: col.fk(), ...cell, key: col.str(40), species: col.str(40), basis: col.str(20), verdict: col.str(20),
        x: col.float(), bin: { type: DataTypes.INTEGER, allowNull: true },
      },
      { sequelize, modelName: 'StatisticsValue', tableName: 'statistics_values', timestamps: false },
    );
  }
}

export class StatisticsSlipFinding extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsSlipFinding.init(
      { id: col.id, submissionId: col.fk(), ...cell, key: col.str(40), code: col.str(60) },
      { sequelize, modelName: 'StatisticsSlipFinding', tableName: 'statistics_slip_findings', timestamps: false },
    );
  }
}

export class StatisticsGroup extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsGroup.init(
      {
        id: col.id, ...cell, students: count, submitted: count, late: count, marked: count, released: count,
        markCount: count, markSum: exact, markSquares: exact, changeToken: { ...col.str(32), defaultValue: '' },
      },
      { sequelize, modelName: 'StatisticsGroup', tableName: 'statistics_groups', timestamps: false },
    );
  }
}

export class StatisticsQuantity extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsQuantity.init(
      {
        id: col.id, ...cell, key: col.str(40), species: col.str(40), basis: col.str(20),
        n: count, students: count, within: count, partial: count, outside: count, notChecked: count, checked: count,
        xSum: exact, xSquares: exact, bins: { ...col.text(), defaultValue: '[]' },
      },
      { sequelize, modelName: 'StatisticsQuantity', tableName: 'statistics_quantities', timestamps: false },
    );
  }
}

export class StatisticsSlip extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsSlip.init(
      { id: col.id, ...cell, code: col.str(60), key: col.str(40), findings: count },
      { sequelize, modelName: 'StatisticsSlip', tableName: 'statistics_slips', timestamps: false },
    );
  }
}

export class StatisticsSlipCode extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsSlipCode.init(
      { id: col.id, ...cell, code: col.str(60), submissions: count, example: col.fk(true) },
      { sequelize, modelName: 'StatisticsSlipCode', tableName: 'statistics_slip_codes', timestamps: false },
    );
  }
}

export class StatisticsMarker extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsMarker.init(
      {
        id: col.id, ...cell, markerId: col.fk(), submissions: count, markCount: count, markSum: exact, markSquares: exact,
        differenceCount: count, differenceSum: exact, differenceSquares: exact, overrides: count, moderations: count, moderationChanges: count,
      },
      { sequelize, modelName: 'StatisticsMarker', tableName: 'statistics_markers', timestamps: false },
    );
  }
}
