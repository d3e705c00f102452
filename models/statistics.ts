/**
 * The kept statistics tables (migration 20261202200000-kept-statistics). Written and read with
 * plain SQL by lib/statistics/keep.ts and queries.ts; these models mirror the schema for
 * inspection and tests. Exact sums are text (lib/statistics/exact.ts); no timestamps.
 */
import { DataTypes, Model, type Sequelize } from 'sequelize';
import { col } from './_base';

// Each attribute gets its own definition object: Sequelize writes into them, so one object shared
// by several columns (or models) would make them one column.
const exact = () => ({ type: DataTypes.TEXT, allowNull: false, defaultValue: '0:0' });
const count = () => col.int(0);
const cell = () => ({ practicalId: col.fk(), cohortId: col.fk() });
const flag = () => ({ type: DataTypes.BOOLEAN, allowNull: false });

export class StatisticsSubmission extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsSubmission.init(
      {
        submissionId: { type: DataTypes.INTEGER, primaryKey: true },
        ...cell(),
        studentId: col.fk(),
        spans: col.bool(),
        late: flag(),
        marked: flag(),
        released: flag(),
        markedById: col.fk(true),
        markPercent: col.float(),
        differencePercent: col.float(),
        overrides: count(),
        moderations: { ...col.text(), defaultValue: '' },
      },
      {
        sequelize,
        modelName: 'StatisticsSubmission',
        tableName: 'statistics_submissions',
        timestamps: false,
        indexes: [
          { name: 'statistics_submissions_student', fields: ['practicalId', 'studentId'] },
          { name: 'statistics_submissions_spans', fields: ['practicalId', 'spans'] },
        ],
      },
    );
  }
}

export class StatisticsValue extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsValue.init(
      {
        id: col.id,
        submissionId: col.fk(),
        ...cell(),
        key: col.str(40),
        species: col.str(40),
        basis: col.str(20),
        verdict: col.str(20),
        x: col.float(),
        bin: { type: DataTypes.INTEGER, allowNull: true },
      },
      {
        sequelize,
        modelName: 'StatisticsValue',
        tableName: 'statistics_values',
        timestamps: false,
        indexes: [
          { name: 'statistics_values_submission', fields: ['submissionId'] },
          { name: 'statistics_values_order', fields: ['practicalId', 'key', 'species', 'basis', 'bin', 'cohortId', 'x'] },
        ],
      },
    );
  }
}

export class StatisticsSlipFinding extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsSlipFinding.init(
      { id: col.id, submissionId: col.fk(), ...cell(), key: col.str(40), code: col.str(60) },
      {
        sequelize,
        modelName: 'StatisticsSlipFinding',
        tableName: 'statistics_slip_findings',
        timestamps: false,
        indexes: [
          { name: 'statistics_slip_findings_submission', fields: ['submissionId'] },
          { name: 'statistics_slip_findings_example', fields: ['practicalId', 'cohortId', 'code', 'submissionId'] },
        ],
      },
    );
  }
}

export class StatisticsGroup extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsGroup.init(
      {
        id: col.id,
        ...cell(),
        students: count(),
        submitted: count(),
        late: count(),
        marked: count(),
        released: count(),
        markCount: count(),
        markSum: exact(),
        markSquares: exact(),
        changeToken: { ...col.str(32), defaultValue: '' },
      },
      {
        sequelize,
        modelName: 'StatisticsGroup',
        tableName: 'statistics_groups',
        timestamps: false,
        indexes: [{ name: 'statistics_groups_key', unique: true, fields: ['practicalId', 'cohortId'] }],
      },
    );
  }
}

export class StatisticsQuantity extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsQuantity.init(
      {
        id: col.id,
        ...cell(),
        key: col.str(40),
        species: col.str(40),
        basis: col.str(20),
        n: count(),
        students: count(),
        within: count(),
        partial: count(),
        outside: count(),
        notChecked: count(),
        checked: count(),
        xSum: exact(),
        xSquares: exact(),
        bins: { ...col.text(), defaultValue: '[]' },
      },
      {
        sequelize,
        modelName: 'StatisticsQuantity',
        tableName: 'statistics_quantities',
        timestamps: false,
        indexes: [{ name: 'statistics_quantities_key', unique: true, fields: ['practicalId', 'cohortId', 'key', 'species', 'basis'] }],
      },
    );
  }
}

export class StatisticsSlip extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsSlip.init(
      { id: col.id, ...cell(), code: col.str(60), key: col.str(40), findings: count() },
      {
        sequelize,
        modelName: 'StatisticsSlip',
        tableName: 'statistics_slips',
        timestamps: false,
        indexes: [{ name: 'statistics_slips_key', unique: true, fields: ['practicalId', 'cohortId', 'code', 'key'] }],
      },
    );
  }
}

export class StatisticsSlipCode extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsSlipCode.init(
      { id: col.id, ...cell(), code: col.str(60), submissions: count(), example: col.fk(true) },
      {
        sequelize,
        modelName: 'StatisticsSlipCode',
        tableName: 'statistics_slip_codes',
        timestamps: false,
        indexes: [{ name: 'statistics_slip_codes_key', unique: true, fields: ['practicalId', 'cohortId', 'code'] }],
      },
    );
  }
}

export class StatisticsMarker extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsMarker.init(
      {
        id: col.id,
        ...cell(),
        markerId: col.fk(),
        submissions: count(),
        markCount: count(),
        markSum: exact(),
        markSquares: exact(),
        differenceCount: count(),
        differenceSum: exact(),
        differenceSquares: exact(),
        overrides: count(),
        moderations: count(),
        moderationChanges: count(),
      },
      {
        sequelize,
        modelName: 'StatisticsMarker',
        tableName: 'statistics_markers',
        timestamps: false,
        indexes: [{ name: 'statistics_markers_key', unique: true, fields: ['practicalId', 'cohortId', 'markerId'] }],
      },
    );
  }
}

/** One row (id 1): which build of the kept tables the rows follow (0: rebuild on first use). */
export class StatisticsMeta extends Model {
  static initModel(sequelize: Sequelize) {
    StatisticsMeta.init(
      { id: { type: DataTypes.INTEGER, primaryKey: true }, keptVersion: { type: DataTypes.INTEGER, allowNull: false } },
      { sequelize, modelName: 'StatisticsMeta', tableName: 'statistics_meta', timestamps: false },
    );
  }
}
