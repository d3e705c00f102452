import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  declare id: CreationOptional<number>;
  declare actorId: number | null;
  declare action: string;
  declare entityType: string;
  declare entityId: number | null;
  declare before: unknown;
  declare after: unknown;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AuditEntry.init(
      {
        id: col.id,
        actorId: col.fk(true),
        action: col.str(80),
        entityType: col.str(60),
        entityId: col.fk(true),
        before: col.json(),
        after: col.json(),
        createdAt: col.date(false),
      },
      { sequelize, modelName: 'AuditEntry', tableName: 'audit_log', updatedAt: false, indexes: [{ fields: ['entityType', 'entityId'] }] },
    );
  }
}
