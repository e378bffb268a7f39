/**
 * Possible drift of a microscope's camera: a new calibration whose fitted camera length
 * (cameraLengthPx, camera length over pixel pitch) differs by more than 1% from the
 * previous calibration at the same setting (same instrument, voltage, nominal camera
 * length and pixel pitch) is flagged. The 1% threshold is the one the lab's records use
 * (common practice for a check between calibrations; a lab may set its own).
 *
 * Pure functions: no store, no clock.
 */
import type { CalibrationRecord } from './store-records';

/** Flag a change of the camera length larger than this fraction. */
export const DRIFT_THRESHOLD = 0.01;

/** Relative tolerance within which two voltages or lengths count as the same setting (recorded values are copies of one another). */
export const SETTING_TOLERANCE = 1e-6;

export interface CalibrationDrift {
  /** Name of the calibration compared against. */
  previousName: string;
  previousCreated: string;
  /** (next - previous) / previous, of cameraLengthPx. */
  relativeChange: number;
  /** Standard uncertainty of relativeChange from the two fits' sigmas (first-order propagation, GUM 5.1.2), 0 when neither has one. */
  relativeChangeSigma: number;
  threshold: number;
  /** |relativeChange| > threshold. */
  flagged: boolean;
  /** One sentence for people, e.g. 'camera length 1.4% above "TEM-2 March" (2026-03-02): possible drift'. */
  message: string;
}

type DriftInput = Pick<CalibrationRecord, 'name' | 'created' | 'cameraLengthPx' | 'cameraLengthSigmaPx'>;

function positiveLength(value: number, name: string): void {
  if (!(Number.isFinite(value) && value > 0)) throw new RangeError(`${name} must be a positive number of pixels; got ${value}`);
}

/**
 * Compares the camera length of `next` with that of `previous`.
 * @param threshold fraction, default DRIFT_THRESHOLD (1%)
 * @throws RangeError for a camera length that is not a positive number, or a threshold not in (0, 1)
 */
export function calibrationDrift(previous: DriftInput, next: DriftInput, threshold: number = DRIFT_THRESHOLD): CalibrationDrift {
  positiveLength(previous.cameraLengthPx, 'previous.cameraLengthPx');
  positiveLength(next.cameraLengthPx, 'next.cameraLengthPx');
  if (!(threshold > 0 && threshold < 1)) throw new RangeError(`threshold must be a fraction in (0, 1); got ${threshold}`);
  const ratio = next.cameraLengthPx / previous.cameraLengthPx;
  const relativeChange = ratio - 1;
  // r = n / p: sigma_r / r = sqrt((sigma_n / n)^2 + (sigma_p / p)^2)
  const relativeChangeSigma =
    ratio * Math.hypot((next.cameraLengthSigmaPx || 0) / next.cameraLengthPx, (previous.cameraLengthSigmaPx || 0) / previous.cameraLengthPx);
  const flagged = Math.abs(relativeChange) > threshold;
  const percent = `${Math.abs(relativeChange * 100).toFixed(2)}%`;
  const direction = relativeChange >= 0 ? 'above' : 'below';
  const against = `"${previous.name}" (${previous.created.slice(0, 10)})`;
  const message = flagged
    ? `camera length ${percent} ${direction} ${against}, more than ${(threshold * 100).toFixed(threshold < 0.01 ? 1 : 0)}%: possible drift; check the microscope's settings (lens currents, specimen height, detector) before using it`
    : `camera length ${percent} ${direction} ${against}, within ${(threshold * 100).toFixed(threshold < 0.01 ? 1 : 0)}%`;
  return { previousName: previous.name, previousCreated: previous.created, relativeChange, relativeChangeSigma, threshold, flagged, message };
}

function sameValue(a: number | null, b: number | null): boolean {
  if (a === null || b === null) return a === b;
  return Math.abs(a - b) <= SETTING_TOLERANCE * Math.max(Math.abs(a), Math.abs(b));
}

type SettingInput = Pick<CalibrationRecord, 'instrument' | 'voltageV' | 'nominalCameraLengthM' | 'pixelSizeM'>;

/**
 * Whether two calibrations were made at the same setting: the same instrument (names
 * compared without regard to ASCII case; both without an instrument also match), voltage,
 * nominal camera length and pixel pitch (both unknown also match), within SETTING_TOLERANCE.
 */
export function sameCalibrationSetting(a: SettingInput, b: SettingInput): boolean {
  // ASCII case only, as SQLite's NOCASE collation compares the stored names.
  const fold = (s: string | null): string | null => (s === null ? null : s.replace(/[A-Z]/g, (c) => c.toLowerCase()));
  const instrumentA = fold(a.instrument);
  const instrumentB = fold(b.instrument);
  return (
    instrumentA === instrumentB &&
    sameValue(a.voltageV, b.voltageV) &&
    sameValue(a.nominalCameraLengthM, b.nominalCameraLengthM) &&
    sameValue(a.pixelSizeM, b.pixelSizeM)
  );
}
