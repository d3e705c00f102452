import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

/** A platform item (resource link) and the practical it opens; always a practical of the context's course. */
export class LtiResourceLink extends Model<InferAttributes<LtiResourceLink>, InferCreationAttributes<LtiResourceLink>> {
  declare id: CreationOptional<number>;
  declare ltiContextId: number;
  declare resourceLinkId: string;
  declare practicalId: number;
  declare title: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    LtiResourceLink.init(
      {
        id: col.id,
        ltiContextId: col.fk(),
        resourceLinkId: col.str(255),
        practicalId: col.fk(),
        title: col.str(300, true),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'LtiResourceLink',
        tableName: 'lti_resource_links',
        indexes: [{ name: 'lti_resource_links_context_link', unique: true, fields: ['ltiContextId', 'resourceLinkId'] }],
      },
    );
  }
}
