/**
 * Oscillab grading engine: pure functions, JSON in and out. See README.md in this folder.
 */
export { checkSubmission, parseQuantity } from './check';
export type { Num, SubmissionInput, SubmissionResult, QuantityCheck, ParseQuantityResult } from './check';

export * from './constants';
export { isotope, stableIsotopes, mostAbundantIsotope, meanAtomicMass, isKnownElement, ISOTOPE_SOURCE } from './isotopes';
export type { IsotopeData } from './isotopes';
export { parseSpecies, reducedMass, speciesFromAtoms, isotopologueKey, speciesDisplay } from './species';
export type { Species, Atom, ParseSpeciesResult, SpeciesInput } from './species';
export { REFERENCE_TABLE, referenceEntry, listKnownSpecies, scaleByIsotopeRelations, vibrationalTerm } from './reference';
export type { ReferenceEntry, MolecularConstants } from './reference';
export { referenceValues, defaultPartner } from './referenceValues';
export type { ReferenceValue } from './referenceValues';
export { QUANTITIES, QUANTITY_KEYS, isQuantityKey } from './quantities';
export type { QuantityKey, QuantityInfo } from './quantities';
export { toSI, fromSI, formatUnit, lookupUnit, unitsFor, uncertaintyToSI, SI_UNIT } from './units';
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
export { fitBand, fitBandConstants, leastSquares, polynomialLeastSquares, combinationDifferences, validateLines, runningIndex, MAX_LINES } from './fit';
export type { BandFit, BandConstantsFit, FitFailure, FitOptions, Line, Branch, Estimate, LineResidual } from './fit';
export { assignPeaks } from './assign';
export type { PeakAssignment, AssignmentResult } from './assign';
export { anharmonicFromOvertone, morseDissociation } from './anharmonic';
export type { AnharmonicAnalysis, AnharmonicResult } from './anharmonic';
export { parseTypedNumber, precisionAgainstUncertainty, relativeUncertaintyOfProduct, combinedUncertainty } from './uncertainty';
export type { TypedNumber, PowerTerm } from './uncertainty';
export { judge, marksFor, DEFAULT_CONSISTENCY_TOLERANCE } from './tolerance';
export type { Tolerance, ToleranceBand, Verdict, Judgement } from './tolerance';
export { SLIPS, SLIP_CODES, diagnose, slipCandidates, massVariants, MIN_SLIP_WINDOW } from './slips';
export type { SlipCode, SlipInfo, Diagnosis } from './slips';
export { simulateLineList, bandConstants, linesFromConstants, chlorinePartner } from './simulate';
export type { SimulatedLine, SimulateOptions, BandConstants } from './simulate';
