import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** One quantity students must report for one isotopologue of a practical. */
export class QuantityDefinition extends Model<InferAttributes<QuantityDefinition>, InferCreationAttributes<QuantityDefinition>> {
  declare id: CreationOptional<number>;
  declare practicalId: number;
  declare key: string;
  declare species: string;
  declare unit: string;
  declare marks: CreationOptional<number>;
  declare uncertaintyRequired: CreationOptional<boolean>;
  /** 'literature' (the engine's published value) or 'department' (referenceValueSI, with a note). */
  declare referenceKind: CreationOptional<'literature' | 'department'>;
  declare referenceValueSI: number | null;
  declare referenceNote: string | null;
  declare position: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    QuantityDefinition.init(
      {
        id: col.id,
        practicalId: col.fk(),
        key: col.str(40),
        species: col.str(40),
        unit: col.str(40),
        marks: { ...col.float(false), defaultValue: 1 },
        uncertaintyRequired: col.bool(false),
        referenceKind: { ...col.str(20), defaultValue: 'literature' },
        referenceValueSI: col.float(),
        referenceNote: col.text(true),
        position: col.int(0),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'QuantityDefinition',
        tableName: 'quantity_definitions',
        indexes: [{ unique: true, fields: ['practicalId', 'key', 'species'] }],
      },
    );
  }
}
