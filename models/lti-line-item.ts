import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** The platform gradebook column (line item) that receives a practical's scores. */
export class LtiLineItem extends Model<InferAttributes<LtiLineItem>, InferCreationAttributes<LtiLineItem>> {
  declare id: CreationOptional<number>;
  declare ltiContextId: number;
  declare practicalId: number;
  declare url: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiLineItem.init(
      {
        id: col.id,
        ltiContextId: col.fk(),
        practicalId: col.fk(),
        url: col.str(1000),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'LtiLineItem',
        tableName: 'lti_line_items',
        indexes: [{ name: 'lti_line_items_context_practical', unique: true, fields: ['ltiContextId', 'practicalId'] }],
      },
    );
  }
}
