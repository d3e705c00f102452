/**
 * The schema is written twice: once in migrations/ (what the database holds) and once in models/
 * (what the code reads and writes). This file runs on the database the real migrations just built
 * (tests/integration/setup.ts: SQLite, and PostgreSQL in the second integration run of `npm test`)
 * and fails on any difference: a table or column on one side only, a different type, nullability or
 * default, an index missing, extra, in another column order, unique on one side only, or named
 * otherwise than the model says.
 */
import { describe, expect, it } from 'vitest';
import { DataTypes, type ModelStatic, type Model } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import { schemaDrift } from '../helpers/schema-drift';

const all = Object.values(models()) as unknown as ModelStatic<Model>[];
const qi = () => sequelize().getQueryInterface();

describe(`models match the schema the migrations build (${sequelize().getDialect()})`, () => {
  it('every table has a model and every model a table', async () => {
    const tables = ((await qi().showAllTables()) as unknown as (string | { tableName: string })[])
      .map((t) => (typeof t === 'string' ? t : t.tableName))
      .filter((t) => t !== 'SequelizeMeta');
    expect(all.map((m) => m.getTableName() as string).sort()).toEqual(tables.sort());
  });

  it.each(all.map((m) => [m.name, m] as const))('%s: columns, types, nullability, defaults and indexes', async (_name, model) => {
    expect(await schemaDrift(model, qi())).toEqual([]);
  });

  it('the comparison notices each kind of drift', async () => {
    // A model of the cohorts table written wrongly on purpose: one column missing (term), one extra,
    // a longer name, a nullable column made NOT NULL, a default the table lacks, a unique index made
    // plain, an index the table lacks, and a real index under another name.
    const wrong = sequelize().define(
      'DriftProbe',
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        courseId: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(200), allowNull: false },
        instrument: { type: DataTypes.STRING(120), allowNull: false },
        colour: { type: DataTypes.STRING(20), allowNull: true },
        archivedAt: { type: DataTypes.DATE, allowNull: true, defaultValue: null },
        createdAt: { type: DataTypes.DATE, allowNull: false },
        updatedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: 'now' },
      },
      {
        tableName: 'cohorts',
        indexes: [{ fields: ['courseId', 'name', 'term'] }, { fields: ['archivedAt'] }],
      },
    );
    const renamed = sequelize().define(
      'DriftProbeNames',
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        subject: { type: DataTypes.STRING(300), allowNull: false, unique: true },
        failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        firstFailureAt: { type: DataTypes.DATE, allowNull: false },
        blockedUntil: { type: DataTypes.DATE, allowNull: true },
        createdAt: { type: DataTypes.DATE, allowNull: false },
        updatedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { tableName: 'sign_in_failures' },
    );
    const submissionColumns = Object.fromEntries(
      Object.entries(models().Submission.getAttributes()).map(([k, a]) => [
        k,
        { type: a.type, allowNull: a.allowNull, primaryKey: a.primaryKey, autoIncrement: a.autoIncrement, defaultValue: a.defaultValue },
      ]),
    );
    const submissionsIndexRenamed = sequelize().define('DriftProbeIndexName', submissionColumns, {
      tableName: 'submissions',
      indexes: (models().Submission.options.indexes ?? []).map((i) => ({
        ...i,
        name: i.name === 'submissions_statistics_scope' ? 'submissions_scope' : i.name,
      })),
    });
    try {
      const drift = await schemaDrift(wrong as ModelStatic<Model>, qi());
      expect(drift).toEqual(
        expect.arrayContaining([
          'cohorts.term: in the database, not in the model',
          'cohorts.colour: in the model, not in the database',
          expect.stringMatching(/^cohorts\.name: type VARCHAR\(120\) in the database, VARCHAR\(200\) in the model$/),
          'cohorts.instrument: nullable in the database, NOT NULL in the model',
          'cohorts.updatedAt: default none in the database, "now" in the model',
          'cohorts: unique index (courseId, name, term) in the database, not in the model',
          'cohorts: index (courseId, name, term) in the model, not in the database',
          'cohorts: index (archivedAt) in the model, not in the database',
        ]),
      );
      expect(drift).toHaveLength(8);
      // The same columns as the real model, and the one UNIQUE constraint: nothing to report.
      expect(await schemaDrift(renamed as ModelStatic<Model>, qi())).toEqual([]);
      expect(await schemaDrift(submissionsIndexRenamed as ModelStatic<Model>, qi())).toEqual([
        'submissions: the model names index (practicalId, isMarkedAttempt, cohortId, status, submittedAt, studentId) "submissions_scope", the database does not',
      ]);
    } finally {
      for (const m of [wrong, renamed, submissionsIndexRenamed]) sequelize().modelManager.removeModel(m);
    }
  });
});
