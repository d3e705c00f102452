export * from './types';
export * from './sniff';
export * from './parse';
export * from './peaks';
export * from './plot';
export * from './plot-style';
export * from './synthesize';
export * from './jcamp-write';
export * from './random';
export { analyseSpectrum } from './analyse';
export type {
  AnalyseOptions,
  SpectrumAnalysis,
  BandAnalysis,
  BandFitReport,
  BandStatus,
  AssignedLine,
  ExcludedLine,
  UnassignedLine,
  CalibrationReport,
} from './analyse';
export { isotopologuesOf, isotopologuesOfAll, predictBand, linePosition, BAND_LABEL } from './bands';
export type { Isotopologue, BandKind, BandPrediction, PredictedLine } from './bands';
export { fitAssignedLines } from './band-fit';
export type { ChosenBandFit, FitLine } from './band-fit';
export type { LineShapeReport } from './detect';
export type { VibrationalAnalysis, IsotopologueVibration, CombinedVibration, AnharmonicNumbers } from './vibration';
