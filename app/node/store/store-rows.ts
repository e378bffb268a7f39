/**
 * Between SQL rows and the store's plain records: the queries the store runs often, and the
 * column-to-field mapping (column names are the schema's, see store-schema.ts).
 */
import type { Database, SqlValue } from 'sql.js';
import { SETTING_TOLERANCE } from './calibration-drift';
import type { CalibrationSetting } from './lab-store';
import type { AnalysisSummary, CalibrationRecord, InstrumentRecord, Verdict } from './store-records';

export type Row = Record<string, SqlValue>;

export function query(db: Database, sql: string, params: Record<string, SqlValue> = {}): Row[] {
  const statement = db.prepare(sql);
  try {
    statement.bind(params);
    const rows: Row[] = [];
    while (statement.step()) rows.push(statement.getAsObject());
    return rows;
  } finally {
    statement.free();
  }
}

export const num = (v: SqlValue): number => Number(v);
const numOrNull = (v: SqlValue): number | null => (v === null ? null : Number(v));
const strOrNull = (v: SqlValue): string | null => (v === null ? null : String(v));

export function toInstrument(row: Row): InstrumentRecord {
  return { name: String(row.name), description: String(row.description), created: String(row.created) };
}

export function toCalibration(row: Row): CalibrationRecord {
  return {
    name: String(row.name),
    instrument: strOrNull(row.instrument),
    voltageV: num(row.voltage_v),
    nominalCameraLengthM: numOrNull(row.nominal_camera_length_m),
    pixelSizeM: numOrNull(row.pixel_size_m),
    created: String(row.created),
    standardPhaseId: String(row.standard_phase_id),
    cameraLengthPx: num(row.camera_length_px),
    cameraLengthSigmaPx: num(row.camera_length_sigma_px),
    axisRatio: num(row.axis_ratio),
    axisRatioSigma: num(row.axis_ratio_sigma),
    angleDeg: num(row.angle_deg),
    angleSigmaDeg: numOrNull(row.angle_sigma_deg),
    residuals: JSON.parse(String(row.residuals_json)),
    imageFingerprints: JSON.parse(String(row.image_fingerprints_json)),
    rejectedRings: JSON.parse(String(row.rejected_rings_json)),
    notes: String(row.notes),
  };
}

export function toAnalysisSummary(row: Row): AnalysisSummary {
  return {
    id: num(row.id),
    sampleId: strOrNull(row.sample_id),
    operator: strOrNull(row.operator),
    created: String(row.created),
    imageSha256: String(row.image_sha256),
    imagePath: strOrNull(row.image_path),
    calibration: strOrNull(row.calibration),
    phase: strOrNull(row.phase),
    aA: numOrNull(row.a_a),
    aSigmaA: numOrNull(row.a_sigma_a),
    verdict: strOrNull(row.verdict) as Verdict | null,
    tolerance: numOrNull(row.tolerance),
  };
}

export const SUMMARY_COLUMNS = 'id, sample_id, operator, created, image_sha256, image_path, calibration, phase, a_a, a_sigma_a, verdict, tolerance';

/** Same value within SETTING_TOLERANCE, or both NULL (SQL for a nullable REAL column). */
export function sameSql(column: string, param: string): string {
  return `((${param} IS NULL AND ${column} IS NULL) OR abs(${column} - ${param}) <= ${SETTING_TOLERANCE} * abs(${param}))`;
}

export function previousIn(db: Database, setting: CalibrationSetting): CalibrationRecord | null {
  const clauses = ['instrument IS :instrument', sameSql('voltage_v', ':voltage'), sameSql('nominal_camera_length_m', ':length')];
  const params: Record<string, SqlValue> = { ':instrument': setting.instrument, ':voltage': setting.voltageV, ':length': setting.nominalCameraLengthM };
  if (setting.pixelSizeM !== undefined) {
    clauses.push(sameSql('pixel_size_m', ':pixel'));
    params[':pixel'] = setting.pixelSizeM;
  }
  if (setting.before !== undefined) {
    clauses.push('created < :before');
    params[':before'] = setting.before;
  }
  const rows = query(db, `SELECT * FROM calibrations WHERE ${clauses.join(' AND ')} ORDER BY created DESC, rowid DESC LIMIT 1`, params);
  return rows.length ? toCalibration(rows[0]!) : null;
}
