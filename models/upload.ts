import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export type UploadKind = 'spectrum' | 'report';

export class Upload extends Model<InferAttributes<Upload>, InferCreationAttributes<Upload>> {
  declare id: CreationOptional<number>;
  declare ownerId: number;
  declare submissionId: number | null;
  declare kind: UploadKind;
  declare originalName: string;
  /** Random name inside the upload directory; never derived from the original name. */
  declare storedName: string;
  declare sha256: string;
  declare size: number;
  declare contentType: string;
  /** Which of the practical's spectra this is (spectra only). */
  declare sample: CreationOptional<string | null>;
  /** Oscillab's analysis of the spectrum, made when it was uploaded (lib/submissions/spectrum-analysis.ts). */
  declare analysis: CreationOptional<Record<string, unknown> | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Upload.init(
      {
        id: col.id,
        ownerId: col.fk(),
        submissionId: col.fk(true),
        kind: col.str(20),
        originalName: col.str(255),
        storedName: { ...col.str(100), unique: true },
        sha256: col.str(64),
        size: { ...col.fk() },
        contentType: col.str(100),
        sample: col.str(40, true),
        analysis: col.json(true),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'Upload', tableName: 'uploads', indexes: [{ fields: ['sha256'] }, { fields: ['submissionId', 'kind'] }] },
    );
  }
}
