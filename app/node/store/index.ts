/**
 * The lab's records (app/node/store): one local SQLite file, shared by the CLI and the
 * desktop app's main process. See lab-store.ts for the guarantees and the opening policy.
 */
export { openLabStore } from './lab-store';
export type {
  AddedCalibration,
  AnalysisFilter,
  CalibrationFilter,
  CalibrationSetting,
  LabStore,
  OpenLabStoreOptions,
} from './lab-store';
export { LabStoreError } from './lab-store-error';
export type { LabStoreProblem, LockHolder } from './lab-store-error';
export { calibrationDrift, sameCalibrationSetting, DRIFT_THRESHOLD } from './calibration-drift';
export type { CalibrationDrift } from './calibration-drift';
export { resolveStorePath, STORE_ENV_VARIABLE, STORE_FILE_NAME } from './store-location';
export type { ResolveStorePathOptions, StoreLocation, StoreLocationSource } from './store-location';
export { STORE_SCHEMA_VERSION, MIGRATIONS } from './store-schema';
export type { Migration } from './store-schema';
export { lockPathOf, DEFAULT_LOCK_TIMEOUT_MS } from './store-lock';
export type {
  AnalysisRecord,
  AnalysisSummary,
  CalibrationRecord,
  CalibrationResidual,
  ImageFingerprint,
  InstrumentRecord,
  NewAnalysis,
  NewCalibration,
  NewInstrument,
  RejectedRing,
  Verdict,
} from './store-records';
