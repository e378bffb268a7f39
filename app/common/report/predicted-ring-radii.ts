/**
 * Where the rings of a chosen phase fall on this detector: the phase's predicted
 * rings (kinematic, core/crystal/predicted-rings.ts), their d scaled by the
 * candidate's fitted isotropic scale when the analysis matched that phase, and
 * placed at R = (L/p) tan(2 asin(lambda / 2d)) with the analysis's camera.
 */
import type { Hkl } from '../../../core/crystal/hkl';
import type { Phase } from '../../../core/crystal/phase';
import { predictRings } from '../../../core/crystal/predicted-rings';
import { dSpacingFromRadiusA, ringRadiusPx } from '../../../core/physics/detector-geometry';
import type { AnalysisResult } from '../../../core/pipeline/analysis-result';
import { hklText } from './number-text';

export interface ReportPredictedRing {
  /** Corrected radius on the detector, px. */
  radiusPx: number;
  dA: number;
  /** Every reflection family on the ring, largest d first. */
  hkls: Hkl[];
  /** '111', or '511/333' for a ring of two families. */
  label: string;
  /** Kinematic relative intensity of the azimuthal-mean profile, 0-100. */
  relativeIntensity: number;
}

export interface ReportPredictedPhase {
  phaseId: string;
  /** 'TiN, a = 4.24678 Å (fitted scale)' or '..., (reference)'. */
  description: string;
  /** Multiplier of the reference d applied (1 for the reference cell). */
  scale: number;
  /** Whether `scale` is the analysis's fitted one. */
  fitted: boolean;
  rings: ReportPredictedRing[];
}

export interface PredictedRingOptions {
  /**
   * Scale the reference cell by the analysis's fitted isotropic scale for this
   * phase, when it has one (default true); false draws the reference cell.
   */
  useFittedScale?: boolean;
  /** Rings weaker than this relativeIntensity (0-100) are left out; default 0.5. */
  minRelativeIntensity?: number;
  /** Largest corrected radius, px; default: the image corner farthest from the centre. */
  maxRadiusPx?: number;
}

/**
 * The predicted rings of `phase` that fall on the image of `result`, sorted by radius.
 * Empty when the analysis has no centre or the phase has no rings in range.
 */
export function predictedRingsForReport(result: AnalysisResult, phase: Phase, options: PredictedRingOptions = {}): ReportPredictedPhase {
  const candidate = result.candidates.find((c) => c.kind === 'phase' && c.phase === phase.id && c.scale !== undefined);
  const fitted = (options.useFittedScale ?? true) && candidate !== undefined;
  const scale = fitted ? candidate!.scale! : 1;
  const aText = `${(phase.cell.aA * scale).toFixed(5)} Å`;
  const description = `${phase.id}, a = ${aText} (${fitted ? 'fitted scale' : 'reference cell'})`;
  const empty: ReportPredictedPhase = { phaseId: phase.id, description, scale, fitted, rings: [] };
  const { xPx, yPx } = result.center;
  const camera = { wavelengthA: result.wavelengthA, cameraLengthPx: result.camera.cameraLengthPx };
  if (!Number.isFinite(xPx) || !Number.isFinite(yPx) || !(camera.cameraLengthPx > 0) || !(camera.wavelengthA > 0)) return empty;
  const { width, height } = result.image;
  const corner = Math.max(...[0, width - 1].flatMap((x) => [0, height - 1].map((y) => Math.hypot(x - xPx, y - yPx))));
  const maxRadiusPx = options.maxRadiusPx ?? corner * Math.sqrt(Math.max(1, result.distortion.axisRatio));
  if (!(maxRadiusPx > 0)) return empty;
  const dMinA = Math.max(0.25, dSpacingFromRadiusA(maxRadiusPx, camera) / scale);
  const minI = options.minRelativeIntensity ?? 0.5;
  const rings: ReportPredictedRing[] = [];
  for (const r of predictRings(phase, { dMinA })) {
    if (r.relativeIntensity < minI) continue;
    const dA = r.dA * scale;
    let radiusPx: number;
    try {
      radiusPx = ringRadiusPx(dA, camera);
    } catch {
      continue; // beyond 90 degrees: not on a flat detector
    }
    if (radiusPx > maxRadiusPx) continue;
    const hkls = r.families.map((f) => f.hkl);
    rings.push({ radiusPx, dA, hkls, label: hkls.map(hklText).join('/'), relativeIntensity: r.relativeIntensity });
  }
  rings.sort((a, b) => a.radiusPx - b.radiusPx);
  return { ...empty, rings };
}
