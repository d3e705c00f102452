import { Model, type Sequelize, type InferAttributes, type InferCreationAttributes, type CreationOptional } from 'sequelize';
import { col } from './_base';

export type PracticalMode = 'practice' | 'assessed';
export type LateRule = 'penalty' | 'not-accepted' | 'none';
/** A hand-marked rubric item (report quality, discussion …): the engine cannot judge these. */
export type RubricItem = { key: string; title: string; marks: number; guidance: string };
/** One spectrum a practical takes: the molecules in that cell and the bands expected in it. */
export type SpectrumSampleSetting = { key: string; label: string; molecules: string[]; bands: ('fundamental' | 'overtone')[] };

export class Practical extends Model<InferAttributes<Practical>, InferCreationAttributes<Practical>> {
  declare id: CreationOptional<number>;
  declare courseId: number;
  declare title: string;
  declare species: string[];
  declare instructions: CreationOptional<string>;
  declare hazardNotes: CreationOptional<string>;
  declare mode: CreationOptional<PracticalMode>;
  declare maxAttempts: CreationOptional<number>;
  declare lateRule: CreationOptional<LateRule>;
  /** Percent of the total deducted per day late, up to latePenaltyCap percent. */
  declare latePenaltyPerDay: CreationOptional<number>;
  declare latePenaltyCap: CreationOptional<number>;
  declare rubric: RubricItem[];
  /** The spectra the practical takes; null: one spectrum holding every molecule (see lib/submissions/spectrum-analysis.ts). */
  declare spectrumSamples: CreationOptional<SpectrumSampleSetting[] | null>;
  /** Show Oscillab's own analysis of the student's spectrum as a third comparison. */
  declare spectrumAnalysis: CreationOptional<boolean>;
  declare copiedFromId: number | null;
  declare archivedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Practical.init(
      {
        id: col.id,
        courseId: col.fk(),
        title: col.str(200),
        species: col.json(false),
        instructions: { ...col.text(), defaultValue: '' },
        hazardNotes: { ...col.text(), defaultValue: '' },
        mode: { ...col.str(20), defaultValue: 'practice' },
        maxAttempts: col.int(3),
        lateRule: { ...col.str(20), defaultValue: 'penalty' },
        latePenaltyPerDay: { ...col.float(false), defaultValue: 10 },
        latePenaltyCap: { ...col.float(false), defaultValue: 50 },
        rubric: col.json(false),
        spectrumSamples: col.json(true),
        spectrumAnalysis: col.bool(false),
        copiedFromId: col.fk(true),
        archivedAt: col.date(),
        createdAt: col.date(false),
        updatedAt: col.date(false),
      },
      { sequelize, modelName: 'Practical', tableName: 'practicals' },
    );
  }
}
