import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export const COURSE_ROLES = ['student', 'ta', 'instructor', 'lead'] as const;
export type CourseRole = (typeof COURSE_ROLES)[number];

export class CourseMembership extends Model<InferAttributes<CourseMembership>, InferCreationAttributes<CourseMembership>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare courseId: number;
  declare role: CourseRole;
  declare cohortId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    CourseMembership.init(
      {
        id: col.id,
        userId: col.fk(),
        courseId: col.fk(),
        role: col.str(20),
        cohortId: col.fk(true),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      {
        sequelize,
        modelName: 'CourseMembership',
        tableName: 'course_memberships',
        indexes: [{ unique: true, fields: ['userId', 'courseId', 'role'] }, { fields: ['courseId', 'role'] }],
      },
    );
  }
}
