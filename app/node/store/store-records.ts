/**
 * The records the lab store keeps, as plain data, and their validation (zod, with messages
 * that name the field). `New...` types are what a caller hands in (optional fields may be
 * left out); `...Record` types are what the store gives back (every field present, null
 * where not known).
 *
 * Units are in the names: `voltageV` (V), `nominalCameraLengthM` and `pixelSizeM` (m),
 * `cameraLengthPx` (camera length over pixel pitch, binning included), `dA` and `aA` (Å),
 * `residualPpm` (parts per million of d), `angleDeg` (degrees from +x toward +y, [0, 180)).
 * `tolerance` is relative (0.005 for 0.5%). Dates are ISO 8601 strings, kept in UTC
 * (`2026-03-02T09:15:00.000Z`); a date alone (`2026-03-02`) means its midnight UTC.
 */
import { z } from 'zod';
import type { Hkl } from '../../../core/crystal';
import { LabStoreError } from './lab-store-error';

const text = (what: string, max: number) =>
  z
    .string({ error: `expected ${what} (text)` })
    .trim()
    .min(1, { error: `expected ${what}, not an empty text` })
    .max(max, { error: `expected ${what} of at most ${max} characters` })
    .regex(/^[^\u0000-\u001f\u007f]*$/, { error: `expected ${what} without control characters (tabs, line breaks)` });

const recordName = (what: string) => text(what, 200);
const optionalText = (what: string, max: number) => text(what, max).nullable().default(null);

const positive = (what: string) => z.number({ error: `expected ${what}: a finite number` }).positive({ error: `expected ${what}: a number > 0` });
const nonNegative = (what: string) => z.number({ error: `expected ${what}: a finite number` }).min(0, { error: `expected ${what}: a number >= 0` });

/** ISO 8601 date-time with an offset, or a date alone; normalised to UTC with milliseconds. */
export const isoDate = z
  .string({ error: 'expected an ISO 8601 date such as 2026-03-02 or 2026-03-02T09:15:00Z' })
  .refine((s) => z.iso.datetime({ offset: true }).safeParse(s).success || z.iso.date().safeParse(s).success, {
    error: 'expected an ISO 8601 date such as 2026-03-02 or 2026-03-02T09:15:00Z',
  })
  .transform((s) => new Date(s).toISOString());

const hkl = z.tuple([z.number().int(), z.number().int(), z.number().int()], { error: 'expected Miller indices [h, k, l] (three integers)' });

const sha256 = z
  .string({ error: 'expected a SHA-256 fingerprint (64 hex digits)' })
  .regex(/^[0-9a-fA-F]{64}$/, { error: 'expected a SHA-256 fingerprint (64 hex digits)' })
  .transform((s) => s.toLowerCase());

export const newInstrumentSchema = z.strictObject({
  name: recordName('an instrument name'),
  description: z.string({ error: 'expected a description (text)' }).max(2000, { error: 'expected a description of at most 2000 characters' }).default(''),
});

const residualSchema = z.strictObject({
  hkl,
  dA: positive('the measured d-spacing in Å'),
  residualPpm: z.number({ error: 'expected the residual in ppm of d: a finite number' }),
  radiusPx: positive('the ring radius in pixels').nullable().default(null),
  /** Index into imageFingerprints of the image the ring was measured on. */
  image: z.number().int().min(0, { error: 'expected an image index >= 0' }).nullable().default(null),
});

const rejectedRingSchema = z.strictObject({
  hkl: hkl.nullable().default(null),
  dA: positive('the d-spacing in Å').nullable().default(null),
  radiusPx: positive('the ring radius in pixels').nullable().default(null),
  residualPpm: z.number({ error: 'expected the residual in ppm of d: a finite number' }).nullable().default(null),
  image: z.number().int().min(0, { error: 'expected an image index >= 0' }).nullable().default(null),
  reason: text('the reason the ring was left out', 500),
});

const imageFingerprintSchema = z.strictObject({
  sha256,
  path: optionalText('the image path', 4000),
});

export const newCalibrationSchema = z.strictObject({
  name: recordName('a calibration name'),
  instrument: optionalText('an instrument name', 200),
  voltageV: positive('the accelerating voltage in V'),
  nominalCameraLengthM: positive('the nominal camera length in m').nullable().default(null),
  pixelSizeM: positive('the detector pixel pitch in m').nullable().default(null),
  created: isoDate.optional(),
  standardPhaseId: recordName('the id of the standard phase (e.g. "Au")'),
  cameraLengthPx: positive('the fitted camera length over pixel pitch'),
  cameraLengthSigmaPx: nonNegative('its standard uncertainty'),
  axisRatio: z.number({ error: 'expected the axis ratio major/minor (a number >= 1)' }).min(1, { error: 'expected the axis ratio major/minor >= 1' }),
  axisRatioSigma: nonNegative('its standard uncertainty'),
  angleDeg: z
    .number({ error: 'expected the major-axis angle in degrees, in [0, 180)' })
    .min(0, { error: 'expected the major-axis angle in degrees, in [0, 180)' })
    .lt(180, { error: 'expected the major-axis angle in degrees, in [0, 180)' }),
  /** Null when the angle is undetermined (axis ratio near 1). */
  angleSigmaDeg: nonNegative('its standard uncertainty').nullable(),
  residuals: z.array(residualSchema, { error: 'expected a list of per-ring residuals' }),
  imageFingerprints: z.array(imageFingerprintSchema, { error: 'expected a list of image fingerprints' }).min(1, { error: 'expected at least one image fingerprint' }),
  rejectedRings: z.array(rejectedRingSchema, { error: 'expected a list of rejected rings' }).default([]),
  notes: z.string({ error: 'expected notes (text)' }).max(20000, { error: 'expected notes of at most 20000 characters' }).default(''),
});

export const newAnalysisSchema = z
  .strictObject({
    sampleId: optionalText('a sample id', 200),
    operator: optionalText("the operator's name", 200),
    created: isoDate.optional(),
    imageSha256: sha256,
    imagePath: optionalText('the image path', 4000),
    calibration: optionalText('the name of the calibration used', 200),
    phase: optionalText('a phase id', 200),
    aA: positive('the lattice constant in Å').nullable().default(null),
    aSigmaA: nonNegative('its standard uncertainty in Å').nullable().default(null),
    verdict: z.enum(['pass', 'fail', 'inconclusive'], { error: "expected the verdict 'pass', 'fail' or 'inconclusive' (or null)" }).nullable().default(null),
    tolerance: z
      .number({ error: 'expected the tolerance as a fraction, e.g. 0.005 for 0.5%' })
      .gt(0, { error: 'expected the tolerance as a fraction in (0, 1), e.g. 0.005 for 0.5%' })
      .lt(1, { error: 'expected the tolerance as a fraction in (0, 1), e.g. 0.005 for 0.5%' })
      .nullable()
      .default(null),
    result: z.unknown().refine((v) => v !== undefined, { error: 'expected the full result (any JSON value)' }),
  })
  .refine((a) => a.aSigmaA === null || a.aA !== null, { error: 'an uncertainty needs its value: give aA too', path: ['aSigmaA'] });

export type NewInstrument = z.input<typeof newInstrumentSchema>;
export type NewCalibration = z.input<typeof newCalibrationSchema>;
export type NewAnalysis = z.input<typeof newAnalysisSchema>;

export interface InstrumentRecord {
  name: string;
  description: string;
  /** When it was first recorded. */
  created: string;
}

/** One ring of a calibration fit: its indices, measured d and residual against the standard. */
export interface CalibrationResidual {
  hkl: Hkl;
  dA: number;
  residualPpm: number;
  radiusPx: number | null;
  image: number | null;
}

export interface RejectedRing {
  hkl: Hkl | null;
  dA: number | null;
  radiusPx: number | null;
  residualPpm: number | null;
  image: number | null;
  reason: string;
}

export interface ImageFingerprint {
  sha256: string;
  path: string | null;
}

export interface CalibrationRecord {
  name: string;
  instrument: string | null;
  voltageV: number;
  nominalCameraLengthM: number | null;
  pixelSizeM: number | null;
  created: string;
  standardPhaseId: string;
  cameraLengthPx: number;
  cameraLengthSigmaPx: number;
  axisRatio: number;
  axisRatioSigma: number;
  angleDeg: number;
  angleSigmaDeg: number | null;
  residuals: CalibrationResidual[];
  imageFingerprints: ImageFingerprint[];
  rejectedRings: RejectedRing[];
  notes: string;
}

export type Verdict = 'pass' | 'fail' | 'inconclusive';

/** An analysis as listed (everything but the full result). */
export interface AnalysisSummary {
  /** Assigned by the store: 1, 2, 3, ... never reused. */
  id: number;
  sampleId: string | null;
  operator: string | null;
  created: string;
  imageSha256: string;
  imagePath: string | null;
  calibration: string | null;
  phase: string | null;
  aA: number | null;
  aSigmaA: number | null;
  verdict: Verdict | null;
  tolerance: number | null;
}

export interface AnalysisRecord extends AnalysisSummary {
  /** The full result as it was given (JSON). */
  result: unknown;
}

function shortJson(value: unknown): string {
  let s: string;
  try {
    s = JSON.stringify(value) ?? String(value);
  } catch {
    s = String(value);
  }
  return s.length > 60 ? s.slice(0, 57) + '...' : s;
}

function formatPath(path: PropertyKey[]): string {
  return path.map((p, i) => (typeof p === 'number' ? `[${p}]` : i === 0 ? String(p) : `.${String(p)}`)).join('');
}

/**
 * Validates a record with `schema`.
 * @param what e.g. 'calibration "TEM-2 200kV"', for the message
 * @throws LabStoreError 'invalid-record' naming every wrong field and what was expected
 */
export function parseRecord<S extends z.ZodType>(schema: S, value: unknown, what: string, storePath: string): z.output<S> {
  const parsed = schema.safeParse(value, { reportInput: true });
  if (parsed.success) return parsed.data;
  const problems = parsed.error.issues.map((issue) => {
    const where = issue.path.length ? formatPath(issue.path) : 'the record';
    const input = (issue as { input?: unknown }).input;
    if (issue.code === 'unrecognized_keys') return `${where}: unknown field${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `"${k}"`).join(', ')}`;
    if (input === undefined && issue.path.length > 0) return `${where}: is missing (${issue.message})`;
    const got = input === undefined || issue.code === 'custom' ? '' : `; got ${shortJson(input)}`;
    return `${where}: ${issue.message}${got}`;
  });
  throw new LabStoreError(storePath, 'invalid-record', `${what} was not saved: ${problems.join('; ')}; correct ${problems.length > 1 ? 'these fields' : 'this field'} and save again`);
}
