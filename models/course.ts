import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export class Course extends Model<InferAttributes<Course>, InferCreationAttributes<Course>> {
  declare id: CreationOptional<number>;
  declare code: string;
  declare title: string;
  declare archivedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Course.init(
      {
        id: col.id,
        code: { ...col.str(40), unique: true },
        title: col.str(200),
        archivedAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'Course', tableName: 'courses' },
    );
  }
}
