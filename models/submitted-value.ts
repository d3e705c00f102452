import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A number as the student typed it (text kept for the significant-figure check) and in SI. */
export class SubmittedValue extends Model<InferAttributes<SubmittedValue>, InferCreationAttributes<SubmittedValue>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare key: string;
  declare species: string;
  declare valueText: string;
  declare unit: CreationOptional<string>;
  declare uncertaintyText: string | null;
  declare valueSI: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SubmittedValue.init(
      {
        id: col.id,
        submissionId: col.fk(),
        key: col.str(40),
        species: col.str(40),
        valueText: col.str(60),
        unit: { ...col.str(40), defaultValue: '' },
        uncertaintyText: col.str(60, true),
        valueSI: col.float(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'SubmittedValue',
        tableName: 'submitted_values',
        indexes: [{ unique: true, fields: ['submissionId', 'key', 'species'] }],
      },
    );
  }
}
