import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export type BandBasis = 'consistency' | 'accuracy';
export type BandKind = 'absolute' | 'relative' | 'sigma';

/** cohortId null is the course-wide default; a row with a cohortId overrides it for that cohort. */
export class ToleranceBand extends Model<InferAttributes<ToleranceBand>, InferCreationAttributes<ToleranceBand>> {
  declare id: CreationOptional<number>;
  declare quantityDefinitionId: number;
  declare cohortId: number | null;
  declare basis: BandBasis;
  declare kind: BandKind;
  /** Full marks within this (relative: a fraction, e.g. 0.005; sigma: a multiple; absolute: in `unit`). */
  declare inner: number;
  /** Partial credit within this, if set. */
  declare outer: number | null;
  declare unit: string | null;
  declare updatedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ToleranceBand.init(
      {
        id: col.id,
        quantityDefinitionId: col.fk(),
        cohortId: col.fk(true),
        basis: col.str(20),
        kind: col.str(20),
        inner: col.float(false),
        outer: col.float(),
        unit: col.str(40, true),
        updatedById: col.fk(true),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'ToleranceBand',
        tableName: 'tolerance_bands',
        indexes: [{ unique: true, fields: ['quantityDefinitionId', 'cohortId', 'basis'] }],
      },
    );
  }
}
