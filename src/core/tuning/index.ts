/**
 * Prior selection: evidence maps and profiles, type-II maximum likelihood, leave-one-out,
 * discrepancy principle, prior predictive check and simulation-based calibration.
 * The whole public API of src/core/tuning; inputs are JSON-able specs, outputs typed arrays.
 */
export type { RouteOptions, TuningControl, TuningRoute } from './dataSpace.ts';
export { projectedPriorCovariance, TUNING_DENSE_LIMIT, tuningRoute } from './dataSpace.ts';
export {
  EIGEN_BREAK_EVEN,
  evidenceMap,
  evidenceProfile,
  finishMap,
  logSpaced,
  setTermLength,
  termLength,
  withTerm,
} from './evidenceMap.ts';
export type {
  EvidenceMap,
  EvidenceMapOptions,
  EvidenceMethod,
  EvidenceProfile,
  EvidenceProfileOptions,
  LogAxis,
  ProfileParameter,
} from './evidenceMap.ts';
export {
  applyHyperParameters,
  evidenceGradient,
  setHyperParameter,
  hyperParameters,
  hyperParameterVector,
  logEvidence,
  maximiseEvidence,
} from './typeII.ts';
export type { EvidenceAndGradient, FittedParameter, HyperParameter, MaximiseOptions, TypeIIResult } from './typeII.ts';
export {
  CRITERIA_DIFFER_EXPLANATION,
  DISCREPANCY_FORM_WORDS,
  discrepancyScale,
  leaveOneOut,
  leaveOneOutFromFactor,
  predictiveFromStatistic,
  priorCriteria,
  priorPredictiveCheck,
  scalePrior,
} from './criteria.ts';
export type { DiscrepancyForm, DiscrepancyResult, LeaveOneOut, PriorCriteria, PriorPredictiveCheck } from './criteria.ts';
export { BAND_LEVELS, calibrate, calibrationTable, replicateSeed } from './calibration.ts';
export type { CalibrationOptions, CalibrationResult, CalibrationTable } from './calibration.ts';
