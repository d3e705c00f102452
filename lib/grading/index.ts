/**
 * Oscillab grading engine: pure functions, JSON in and out. See README.md in this folder.
 */
export { checkSubmission, parseQuantity } from './check';
export type { Num, SubmissionInput, SubmissionResult, QuantityCheck, ParseQuantityResult, Notice, FitChoiceSummary } from './check';
export type { Note } from './advice';
export { recompute, withInputRounding } from './own-data';
export type { ConsistencyKind, Recomputed, RecomputeMethod } from './own-data';
export { partialFTest, runsTest } from './statistics';
export type { FTest, RunsTest } from './statistics';

export * from './constants';
export { isotope, stableIsotopes, mostAbundantIsotope, meanAtomicMass, isKnownElement, ISOTOPE_SOURCE } from './isotopes';
export type { IsotopeData } from './isotopes';
export { parseSpecies, reducedMass, speciesFromAtoms, isotopologueKey, speciesDisplay } from './species';
export type { Species, Atom, ParseSpeciesResult, SpeciesInput } from './species';
export { REFERENCE_TABLE, referenceEntry, listKnownSpecies, scaleByIsotopeRelations, vibrationalTerm } from './reference';
export type { ReferenceEntry, MolecularConstants } from './reference';
export { referenceValues, defaultPartner, morseEstimates, harmonicIsotopeReference } from './referenceValues';
export type { ReferenceValue } from './referenceValues';
export { QUANTITIES, QUANTITY_KEYS, isQuantityKey, CONSISTENCY_KIND, ACCURACY_KIND } from './quantities';
export type { QuantityKey, QuantityInfo } from './quantities';
export { toSI, fromSI, formatUnit, lookupUnit, unitsFor, uncertaintyToSI, ambiguousUnitMessage, SI_UNIT } from './units';
export type { Dimension, UnitDefinition, ToSIResult, FromSIResult } from './units';
export { formatNumber, formatTyped } from './format';
export {
  forceConstantFromBand,
  bandCentreFromForceConstant,
  isotopologueRatio,
  predictIsotopologueBand,
  bondLengthFromB,
  rotationalConstantFromBondLength,
} from './harmonic';
export {
  fitBand,
  fitBandModels,
  fitBandConstants,
  leastSquares,
  polynomialLeastSquares,
  nestedPolynomialLeastSquares,
  combinationDifferences,
  validateLines,
  runningIndex,
  MAX_LINES,
  CENTRIFUGAL_TEST_LEVEL,
  SYSTEMATIC_RESIDUALS_LEVEL,
  MIN_DEGREES_OF_FREEDOM_FOR_ERRORS,
} from './fit';
export type {
  BandFit,
  BandModels,
  ModelChoice,
  FitWarning,
  BandConstantsFit,
  FitFailure,
  FitOptions,
  Line,
  Branch,
  Estimate,
  LineResidual,
} from './fit';
export { assignPeaks } from './assign';
export type { PeakAssignment, AssignmentResult } from './assign';
export { anharmonicFromOvertone, morseDissociation } from './anharmonic';
export type { AnharmonicAnalysis, AnharmonicResult } from './anharmonic';
export {
  parseTypedNumber,
  precisionAgainstUncertainty,
  effectiveLastDigitPower,
  roundingHalfWidth,
  uncertaintyTooPrecise,
  relativeUncertaintyOfProduct,
  combinedUncertainty,
} from './uncertainty';
export type { TypedNumber, PowerTerm } from './uncertainty';
export { judge, marksFor, DEFAULT_CONSISTENCY_WORDS, FITTED_CONSISTENCY_SIGMA, FLOATING_POINT_ALLOWANCE } from './tolerance';
export type { Tolerance, ToleranceBand, Verdict, Judgement } from './tolerance';
export { SLIPS, SLIP_CODES, diagnose, slipCandidates, massVariants, MIN_SLIP_WINDOW } from './slips';
export type { SlipCode, SlipInfo, Diagnosis, SlipInputs, FittedConstants } from './slips';
export { simulateLineList, bandConstants, linesFromConstants, chlorinePartner } from './simulate';
export type { SimulatedLine, SimulateOptions, BandConstants } from './simulate';
